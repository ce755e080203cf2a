/**
 * The board: the coach's home at the rink. Tap skater tiles, tap a cue chip (main zone "needs
 * work", end zone "good"): each tap is a note saved on this device at once, confirmed in the undo
 * bar at the bottom, and listed in today's feed. Works the same with no network.
 *
 * Phone (390 px): one column, tiles then chips then feed, the undo bar docked at the bottom where
 * the thumb is. Wide (>= 1024 px): three panes side by side (tiles | chips | session and feed),
 * each scrolling on its own, the undo bar across the bottom.
 */
import { useQuery } from '@tanstack/react-query';
import { useCallback, useMemo, useState, type ReactNode } from 'react';
import { ScrollView, StyleSheet, View, useWindowDimensions } from 'react-native';

import type { Cue, Observation, Skater } from '../../shared/schemas';
import {
  cuesOnDevice,
  observationsOnDevice,
  squadOnDevice,
  useLoadTeamFromServer,
  usePendingSummary,
  useRemoveObservations,
  useTodaySession,
  useUpdateObservation,
  useUpdateSession,
} from '../../store/board';
import { useBoardUi } from '../../store/board-ui';
import { useConnectivity } from '../../store/connectivity';
import { useActiveMembership, useSession } from '../../store/session';
import { Banner, Button, Heading, Loading, Text, TextLink, colors, layout, spacing, useBreakpoint } from '../ui';
import { BoardCaution } from './board-caution';
import { CueLibrary } from './cue-library';
import { CuePad } from './cue-pad';
import { joinNames } from './format';
import { NoteFeed } from './note-feed';
import { SessionPanel } from './session-panel';
import { SkaterTiles } from './skater-tiles';
import { StatusLine } from './status-line';
import { UndoBar } from './undo-bar';
import { useRecorder, type Recording } from './use-recorder';

const THREE_PANES_FROM = 1280;
const EMPTY_OBS: Observation[] = [];
const EMPTY_CUES: Cue[] = [];

export function BoardScreen() {
  const wide = useBreakpoint() === 'wide';
  // Three panes need room for readable chips; a 1024-1279 px window gets two (tiles and notes | cues).
  const threePanes = useWindowDimensions().width >= THREE_PANES_FROM;
  const membership = useActiveMembership();
  const teamId = membership?.teamId ?? '';
  const isHead = membership?.role === 'head_coach';

  const serverOnline = useConnectivity((s) => s.online);
  const signedInOffline = useSession((s) => s.offline);
  const offline = !serverOnline || signedInOffline;
  const pending = usePendingSummary();

  const fromServer = useLoadTeamFromServer(teamId);
  const squad = useQuery({ ...squadOnDevice(teamId), enabled: !!teamId });
  const cueQuery = useQuery({ ...cuesOnDevice(teamId), enabled: !!teamId });
  const session = useTodaySession(teamId);
  const sessionId = session.data?.id;
  const feed = useQuery({ ...observationsOnDevice(sessionId ?? ''), enabled: !!sessionId });

  const selectedRaw = useBoardUi((s) => s.selected);
  const group = useBoardUi((s) => s.group);
  const toggleSkater = useBoardUi((s) => s.toggleSkater);
  const clearSelection = useBoardUi((s) => s.clearSelection);
  const setGroup = useBoardUi((s) => s.setGroup);
  const [libraryOpen, setLibraryOpen] = useState(false);

  const skaters = useMemo(() => squad.data?.skaters ?? [], [squad.data]);
  const groups = squad.data?.groups ?? [];
  const cues = cueQuery.data ?? EMPTY_CUES;
  const observations = feed.data ?? EMPTY_OBS;
  const skaterById = useMemo(() => new Map<string, Skater>(skaters.map((s) => [s.id, s])), [skaters]);
  const cueById = useMemo(() => new Map<string, Cue>(cues.map((c) => [c.id, c])), [cues]);
  // A pick can outlive a squad change (or a team switch): only skaters still here count.
  const selected = useMemo(() => selectedRaw.filter((id) => skaterById.has(id)), [selectedRaw, skaterById]);
  const counts = useMemo(() => {
    const out: Record<string, number> = {};
    for (const o of observations) out[o.skaterId] = (out[o.skaterId] ?? 0) + 1;
    return out;
  }, [observations]);

  const namesOf = useCallback(
    (ids: readonly string[]) => joinNames(ids.map((id) => skaterById.get(id)?.displayName ?? 'a skater')),
    [skaterById],
  );
  const describe = useCallback(
    (r: Recording) => `${cueById.get(r.cueId)?.label ?? 'cue'} for ${namesOf(r.skaterIds)}`,
    [cueById, namesOf],
  );
  const recorder = useRecorder(teamId, sessionId, describe);
  const { setHold } = recorder;

  const update = useUpdateObservation();
  const remove = useRemoveObservations();
  const updateSession = useUpdateSession(teamId);

  // ---- states before the board can work -----------------------------------------------------
  if (!teamId) return <Loading label="Finding your team…" testID="coach-home" />;
  if (squad.isPending || cueQuery.isPending || session.isPending) {
    return <Loading label="Opening this device's notebook…" testID="coach-home" />;
  }
  const loadError = squad.error ?? cueQuery.error ?? session.error;
  if (loadError) {
    return (
      <View style={styles.root} testID="coach-home">
        <View style={styles.phoneContent}>
          <Banner kind="error" title="The board could not be opened" testID="board-load-error">
            {loadError.message}
          </Banner>
        </View>
      </View>
    );
  }
  const today = session.data!;

  const latest = recorder.latest;
  const latestObs = latest ? observations.find((o) => o.id === latest.ids[0]) : undefined;
  const undoBar = (
    <UndoBar
      latest={
        latest
          ? {
              key: latest.ids[0],
              cueLabel: cueById.get(latest.cueId)?.label ?? 'Cue',
              names: namesOf(latest.skaterIds),
              mark: latest.mark,
              repeat: latest.repeat,
              count: latest.ids.length,
            }
          : null
      }
      notice={recorder.notice}
      currentNote={latestObs?.note ?? ''}
      onUndo={recorder.undo}
      onEditing={setHold}
      wide={wide}
      onSaveNote={(note) => {
        if (!latest) return;
        for (const id of latest.ids) update.mutate({ sessionId: today.id, id, patch: { note } });
        recorder.say({ kind: 'saved', text: note ? `Note saved for ${namesOf(latest.skaterIds)}.` : 'Note removed.' });
      }}
    />
  );

  // ---- the three parts ----------------------------------------------------------------------
  const fetching = fromServer.isFetching && !offline;
  const tiles =
    skaters.length === 0 ? (
      <View style={styles.empty} testID="board-no-skaters">
        <Text weight="bold">{fetching ? 'Fetching your squad…' : 'No skaters on this device yet'}</Text>
        <Text tone="muted">
          {offline
            ? 'Skaters come to this device the next time you open the board with a connection. You can also add them under Squad.'
            : 'Add skaters and groups under Squad; they appear here as tiles.'}
        </Text>
        <TextLink href="/squad" label="Go to Squad" testID="board-go-squad" />
      </View>
    ) : (
      <SkaterTiles
        skaters={skaters}
        groups={groups}
        selected={selected}
        counts={counts}
        group={group}
        onToggle={toggleSkater}
        onClear={clearSelection}
        onGroup={setGroup}
      />
    );

  const liveCues = cues.filter((c) => !c.archived);
  const libraryButton = isHead ? (
    <Button label="Edit cue library" variant="quiet" onPress={() => setLibraryOpen(true)} testID="cue-library-open" />
  ) : null;
  const chips = (
    <View style={styles.section}>
      <View style={styles.sectionHead}>
        <Heading level={2} style={styles.grow}>
          Cues
        </Heading>
        {libraryButton}
      </View>
      <Text variant="caption" tone="muted">
        Tap the cue for “needs work”, the end of the chip for “good”.
        {selected.length > 1 ? ` Goes to all ${selected.length} picked skaters.` : ''}
      </Text>
      {liveCues.length === 0 ? (
        <View style={styles.empty} testID="board-no-cues">
          <Text weight="bold">No cues yet</Text>
          <Text tone="muted">
            {isHead
              ? 'Add your first cues in the cue library.'
              : 'The head coach adds cues to the library; they reach this device with the next connection.'}
          </Text>
        </View>
      ) : (
        <CuePad cues={cues} focusIds={today.focusCueIds} onTap={(cueId, mark) => recorder.tap(cueId, mark, selected)} />
      )}
    </View>
  );

  const sessionPanel = (
    <SessionPanel
      key={today.id}
      session={today}
      cues={cues}
      error={updateSession.error?.message ?? null}
      saving={updateSession.isPending}
      onSave={(patch) => updateSession.mutate({ sessionId: today.id, patch })}
    />
  );

  const feedPart = (
    <View style={styles.section}>
      <Heading level={2}>{`Today’s notes (${observations.length})`}</Heading>
      {update.error ? (
        <Banner kind="error" testID="feed-error">
          {`Change not saved: ${update.error.message}`}
        </Banner>
      ) : null}
      <NoteFeed
        observations={observations}
        skaters={skaterById}
        cues={cueById}
        onSave={(id, patch) => update.mutate({ sessionId: today.id, id, patch })}
        onDelete={(id) => {
          remove.mutate({ sessionId: today.id, ids: [id] });
          recorder.say({ kind: 'undone', text: 'Note deleted.' });
        }}
      />
    </View>
  );

  const status = <StatusLine day={today.day} offline={offline} pending={pending} title={today.title} rink={today.rink} />;
  const library = <CueLibrary teamId={teamId} cues={cues} onClose={() => setLibraryOpen(false)} />;

  if (wide) {
    return (
      <View style={styles.root} testID="coach-home">
        <View style={styles.wideTop}>{status}</View>
        <View style={styles.panes}>
          <Pane testID="pane-skaters" style={threePanes ? styles.tilePane : styles.tileFeedPane}>
            <Heading level={2}>{`Skaters (${skaters.length})`}</Heading>
            {tiles}
            {threePanes ? null : (
              <>
                {feedPart}
                {sessionPanel}
                <BoardCaution />
              </>
            )}
          </Pane>
          <Pane testID="pane-cues" style={styles.cuePane}>
            {libraryOpen ? library : chips}
          </Pane>
          {threePanes ? (
            <Pane testID="pane-feed" style={styles.feedPane}>
              {sessionPanel}
              {feedPart}
              <BoardCaution />
            </Pane>
          ) : null}
        </View>
        <View style={styles.wideBar}>{undoBar}</View>
      </View>
    );
  }

  return (
    <View style={styles.root} testID="coach-home">
      <ScrollView style={styles.fill} contentContainerStyle={styles.phoneContent} keyboardShouldPersistTaps="handled">
        {status}
        {libraryOpen ? (
          library
        ) : (
          <>
            {tiles}
            {chips}
            {feedPart}
            {sessionPanel}
            <BoardCaution />
          </>
        )}
      </ScrollView>
      {/* Scrolled down among the chips, the coach still sees who the next tap goes to. */}
      {!latest && !recorder.notice && selected.length > 0 && !libraryOpen ? (
        <View style={styles.pickBar} testID="pick-bar">
          <Text weight="bold" numberOfLines={2} style={styles.grow}>
            {`For: ${namesOf(selected)}`}
          </Text>
          <Button label="Clear" variant="secondary" onPress={clearSelection} testID="pick-bar-clear" accessibilityLabel="Clear the picked skaters" />
        </View>
      ) : (
        undoBar
      )}
    </View>
  );
}

function Pane({ children, style, testID }: { children: ReactNode; style: object; testID: string }) {
  return (
    <View style={[styles.pane, style]} testID={testID}>
      <ScrollView style={styles.fill} contentContainerStyle={styles.paneContent} keyboardShouldPersistTaps="handled">
        {children}
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, backgroundColor: colors.background },
  fill: { flex: 1 },
  grow: { flex: 1 },
  phoneContent: { padding: spacing.md, gap: spacing.lg, paddingBottom: spacing.xl },
  section: { gap: spacing.sm },
  sectionHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  empty: { gap: spacing.xs, padding: spacing.md, borderRadius: 12, borderWidth: 1, borderColor: colors.divider, backgroundColor: colors.surface },
  wideTop: { paddingHorizontal: spacing.lg, paddingTop: spacing.md, paddingBottom: spacing.sm, maxWidth: layout.contentMaxWidth + 400, width: '100%' },
  panes: { flex: 1, flexDirection: 'row', gap: spacing.md, paddingHorizontal: spacing.lg, maxWidth: layout.contentMaxWidth + 400, width: '100%' },
  pane: { borderRadius: 16, borderWidth: 1, borderColor: colors.divider, backgroundColor: colors.surface, overflow: 'hidden' },
  paneContent: { padding: spacing.md, gap: spacing.md },
  tilePane: { flex: 1.2, minWidth: 250 },
  tileFeedPane: { flex: 1, minWidth: 300 },
  cuePane: { flex: 1, minWidth: 280 },
  feedPane: { flex: 1, minWidth: 260, maxWidth: 460, backgroundColor: colors.background },
  pickBar: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    paddingVertical: spacing.xs,
    paddingHorizontal: spacing.md,
    backgroundColor: colors.surfaceSunken,
    borderTopWidth: 1,
    borderTopColor: colors.divider,
  },
  wideBar: { paddingHorizontal: spacing.lg, paddingVertical: spacing.sm, maxWidth: layout.contentMaxWidth + 400, width: '100%' },
});

