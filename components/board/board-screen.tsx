/**
 * The board: the coach's home at the rink. Tap skater tiles, tap a cue chip (main zone "needs
 * work", end zone "good"): each tap is a note saved on this device at once, confirmed in the undo
 * bar at the bottom, and listed in today's feed. Works the same with no network.
 *
 * Phone (390 px): the first screen is the whole board and never scrolls: a compact grid of tiles
 * (16 skaters in four rows), a fixed slot for the pick or the undo bar (it covers nothing, and
 * nothing moves when it changes), then the cue switcher (focus cues, each phase) over one set of
 * chips. Today's notes, the session and the safety line follow below the board, for review.
 * Wide (>= 1024 px): three panes side by side (tiles | chips | session and feed), each scrolling
 * on its own, the undo bar across the bottom.
 *
 * A tap must cost one frame. So this screen does not subscribe to the notes, the pick, the
 * recorder's undo stack or the waiting count: the parts that show them (feed, tiles, undo bar,
 * status line, pick line) each subscribe on their own and are memoised with stable props, so a
 * tap on a chip re-renders the new feed item, the tile whose count moved, the undo bar and the
 * status line, and nothing else.
 */
import { useQuery } from '@tanstack/react-query';
import { memo, useCallback, useMemo, useRef, useState, type ReactNode } from 'react';
import { ScrollView, StyleSheet, View, useWindowDimensions, type LayoutChangeEvent } from 'react-native';

import { useStore } from 'zustand';

import type { Cue, Group, Observation, ObservationPatch, Skater } from '../../shared/schemas';
import {
  cuesOnDevice,
  observationsOnDevice,
  squadOnDevice,
  useRemoveObservations,
  useTodaySession,
  useUpdateObservation,
  useUpdateSession,
} from '../../store/board';
import { useBoardUi } from '../../store/board-ui';
import { useConnectivity } from '../../store/connectivity';
import { useSyncStatus } from '../../store/sync-status';
import { useActiveMembership, useSession } from '../../store/session';
import { Banner, Button, Heading, Loading, Text, TextLink, colors, layout, radius, spacing, useBreakpoint } from '../ui';
import { BoardCaution } from './board-caution';
import { CueLibrary } from './cue-library';
import { CuePad } from './cue-pad';
import { joinNames } from './format';
import { NoteFeed } from './note-feed';
import { PhasePad } from './phase-pad';
import { SessionPanel } from './session-panel';
import { SkaterTiles, groupFilters } from './skater-tiles';
import { BoardStatusLine } from './status-line';
import { UndoBar } from './undo-bar';
import { useLatestCallback } from './use-latest';
import { latestOf, useRecorder, type Recording, type RecorderStore } from './use-recorder';

const THREE_PANES_FROM = 1280;
/** The phone's tile area shows at most four rows (16 skaters); a larger squad scrolls inside it. */
const PHONE_TILES_MAX_HEIGHT = 4 * 60;
/** The app's top bar and tab bar on a phone: the board's first guess before it is measured. */
const PHONE_CHROME = 56 + 66;
const EMPTY_OBS: Observation[] = [];
const EMPTY_CUES: Cue[] = [];
const EMPTY_GROUPS: Group[] = [];

export function BoardScreen() {
  const wide = useBreakpoint() === 'wide';
  // Three panes need room for readable chips; a 1024-1279 px window gets two (tiles and notes | cues).
  const window = useWindowDimensions();
  const threePanes = window.width >= THREE_PANES_FROM;
  // The phone board takes exactly the height the shell leaves it, measured on the root.
  const [boardHeight, setBoardHeight] = useState(() => Math.max(window.height - PHONE_CHROME, 480));
  const onRootLayout = useCallback((event: LayoutChangeEvent) => {
    const h = Math.floor(event.nativeEvent.layout.height);
    if (h > 0) setBoardHeight(h);
  }, []);
  const membership = useActiveMembership();
  const teamId = membership?.teamId ?? '';
  const isHead = membership?.role === 'head_coach';

  const serverOnline = useConnectivity((s) => s.online);
  const signedInOffline = useSession((s) => s.offline);
  const offline = !serverOnline || signedInOffline;

  // The squad and cue library reach this device through sync (pull), like everything else.
  const syncing = useSyncStatus((st) => st.running);
  const squad = useQuery({ ...squadOnDevice(teamId), enabled: !!teamId });
  const cueQuery = useQuery({ ...cuesOnDevice(teamId), enabled: !!teamId });
  const session = useTodaySession(teamId);
  const sessionId = session.data?.id;

  const clearSelection = useBoardUi((s) => s.clearSelection);
  const [libraryOpen, setLibraryOpen] = useState(false);

  const skaters = useMemo(() => squad.data?.skaters ?? [], [squad.data]);
  const groups = squad.data?.groups ?? EMPTY_GROUPS;
  const cues = cueQuery.data ?? EMPTY_CUES;
  const skaterById = useMemo(() => new Map<string, Skater>(skaters.map((s) => [s.id, s])), [skaters]);
  // Names for what was written before: a note for a skater retired since still names them.
  const everyoneById = useMemo(
    () => new Map<string, Skater>((squad.data?.everyone ?? skaters).map((s) => [s.id, s])),
    [squad.data, skaters],
  );
  const cueById = useMemo(() => new Map<string, Cue>(cues.map((c) => [c.id, c])), [cues]);
  const liveCueCount = useMemo(() => cues.filter((c) => !c.archived).length, [cues]);

  const namesOf = useCallback(
    (ids: readonly string[]) => joinNames(ids.map((id) => everyoneById.get(id)?.displayName ?? 'a skater')),
    [everyoneById],
  );
  const describe = useCallback(
    (r: Recording) => `${cueById.get(r.cueId)?.label ?? 'cue'} for ${namesOf(r.skaterIds)}`,
    [cueById, namesOf],
  );
  const recorder = useRecorder(teamId, sessionId, describe);
  const { tap, say } = recorder;

  const update = useUpdateObservation();
  const remove = useRemoveObservations();
  const updateSession = useUpdateSession(teamId);

  // Read at the tap, not subscribed to: picking a skater does not re-render the board. A pick can
  // outlive a squad change (or a team switch): only skaters still here count.
  const skaterByIdRef = useRef(skaterById);
  skaterByIdRef.current = skaterById;
  const onCueTap = useCallback(
    (cueId: string, mark: Observation['mark']) =>
      tap(cueId, mark, useBoardUi.getState().selected.filter((id) => skaterByIdRef.current.has(id))),
    [tap],
  );
  const saveObservation = useLatestCallback((id: string, patch: ObservationPatch) => {
    if (sessionId) update.mutate({ sessionId, id, patch });
  });
  const deleteObservation = useLatestCallback((id: string) => {
    if (!sessionId) return;
    remove.mutate({ sessionId, ids: [id] });
    say({ kind: 'undone', text: 'Note deleted.' });
  });
  const saveLatestNote = useLatestCallback((latest: Recording, note: string, shared: boolean) => {
    if (!sessionId) return;
    for (const id of latest.ids) update.mutate({ sessionId, id, patch: { note, noteShared: shared } });
    const whom = namesOf(latest.skaterIds);
    say({
      kind: 'saved',
      text: note ? `Note saved for ${whom}${shared ? ', shared with the skater' : ', coaches only'}.` : 'Note removed.',
    });
  });
  const openLibrary = useCallback(() => setLibraryOpen(true), []);
  const closeLibrary = useCallback(() => setLibraryOpen(false), []);

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

  // ---- the three parts ----------------------------------------------------------------------
  const fetching = syncing && !offline;
  const noSkaters =
    skaters.length === 0 ? (
      <View style={styles.empty} testID="board-no-skaters">
        <Text weight="bold">{fetching ? 'Fetching your squad…' : 'No skaters on this device yet'}</Text>
        <Text tone="muted">
          {offline
            ? 'Skaters come to this device with the next sync, once there is a connection. You can also add them under Squad.'
            : 'Add skaters and groups under Squad; they appear here as tiles.'}
        </Text>
        <TextLink href="/squad" label="Go to Squad" testID="board-go-squad" />
      </View>
    ) : null;
  const tiles = noSkaters ?? <BoardTiles skaters={skaters} groups={groups} skaterById={skaterById} sessionId={today.id} compact={!wide} />;

  const libraryButton = isHead ? (
    <Button label="Edit cue library" variant="quiet" onPress={openLibrary} testID="cue-library-open" />
  ) : null;
  const noCues =
    liveCueCount === 0 ? (
      <View style={styles.empty} testID="board-no-cues">
        <Text weight="bold">No cues yet</Text>
        <Text tone="muted">
          {isHead
            ? 'Add your first cues in the cue library.'
            : 'The head coach adds cues to the library; they reach this device with the next connection.'}
        </Text>
      </View>
    ) : null;
  const chips = (
    <View style={styles.section}>
      <View style={styles.sectionHead}>
        <Heading level={2} style={styles.grow}>
          Cues
        </Heading>
        {libraryButton}
      </View>
      <CuesHint skaterById={skaterById} />
      {noCues ?? <CuePad cues={cues} focusIds={today.focusCueIds} onTap={onCueTap} />}
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
    <FeedPart
      sessionId={today.id}
      skaterById={everyoneById}
      cueById={cueById}
      error={update.error ? update.error.message : null}
      onSave={saveObservation}
      onDelete={deleteObservation}
    />
  );

  const status = <BoardStatusLine day={today.day} offline={offline} title={today.title} rink={today.rink} />;
  const library = <CueLibrary teamId={teamId} cues={cues} onClose={closeLibrary} />;
  const bottom = (
    <BottomBar
      recorder={recorder.store}
      sessionId={today.id}
      cueById={cueById}
      skaterById={skaterById}
      namesOf={namesOf}
      wide={wide}
      compact={!wide}
      onUndo={recorder.undo}
      onEditing={recorder.setHold}
      onSaveNote={saveLatestNote}
      onClearPick={clearSelection}
    />
  );

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
        <View style={styles.wideBar}>{bottom}</View>
      </View>
    );
  }

  if (libraryOpen) {
    return (
      <View style={styles.root} testID="coach-home">
        <ScrollView style={styles.fill} contentContainerStyle={styles.phoneContent} keyboardShouldPersistTaps="handled">
          {status}
          {library}
        </ScrollView>
      </View>
    );
  }

  return (
    <View style={styles.root} testID="coach-home" onLayout={onRootLayout}>
      <ScrollView style={styles.fill} keyboardShouldPersistTaps="handled" testID="board-scroll">
        <View style={[styles.phoneBoard, { height: boardHeight }]} testID="board-phone">
          <View style={styles.phoneTop}>
            <View style={styles.grow}>
              <BoardStatusLine day={today.day} offline={offline} compact />
            </View>
            {groups.length > 0 && skaters.length > 0 ? <GroupSwitch skaters={skaters} groups={groups} /> : null}
          </View>
          {noSkaters ?? (
            <ScrollView style={styles.phoneTiles} contentContainerStyle={styles.phoneTilesContent}>
              {tiles}
            </ScrollView>
          )}
          <PhoneSlot recorder={recorder.store}>{bottom}</PhoneSlot>
          {noCues ?? <PhasePad cues={cues} focusIds={today.focusCueIds} onTap={onCueTap} />}
        </View>
        <View style={styles.phoneBelow}>
          {libraryButton ? <View style={styles.phoneLibrary}>{libraryButton}</View> : null}
          {feedPart}
          {sessionPanel}
          <BoardCaution />
        </View>
      </ScrollView>
    </View>
  );
}

/**
 * The phone's slot between the tiles and the cues: a fixed height, so the chips never move when
 * the pick line, the undo bar or a notice take turns in it; it grows only while a note is typed.
 */
const PhoneSlot = memo(function PhoneSlot({ recorder, children }: { recorder: RecorderStore; children: ReactNode }) {
  const typing = useStore(recorder, (s) => s.hold);
  return (
    <View style={typing ? styles.slotOpen : styles.slot} testID="board-slot">
      {children}
    </View>
  );
});

/**
 * The phone's group filter: one button that steps through Everyone, each group and "No group",
 * so the filter costs no row of its own above the tiles.
 */
const GroupSwitch = memo(function GroupSwitch({ skaters, groups }: { skaters: Skater[]; groups: Group[] }) {
  const group = useBoardUi((s) => s.group);
  const setGroup = useBoardUi((s) => s.setGroup);
  const filters = useMemo(() => groupFilters(skaters, groups), [skaters, groups]);
  const index = Math.max(0, filters.findIndex((f) => f.value === group));
  const next = filters[(index + 1) % filters.length];
  return (
    <Button
      label={`${filters[index].label} \u25B8`}
      variant="secondary"
      style={styles.groupSwitch}
      onPress={() => setGroup(next.value)}
      testID="group-switch"
      accessibilityLabel={`Showing ${filters[index].label}. Show ${next.label}`}
    />
  );
});

/** The pick (only skaters still in the squad), in the order the skaters were picked. */
function usePicked(skaterById: ReadonlyMap<string, Skater>): string[] {
  const raw = useBoardUi((s) => s.selected);
  return useMemo(() => raw.filter((id) => skaterById.has(id)), [raw, skaterById]);
}

/** The tiles with the pick and the group filter: re-rendered by a tile tap, not by a chip tap. */
const BoardTiles = memo(function BoardTiles({
  skaters,
  groups,
  skaterById,
  sessionId,
  compact,
}: {
  skaters: Skater[];
  groups: Group[];
  skaterById: ReadonlyMap<string, Skater>;
  sessionId: string;
  compact: boolean;
}) {
  const selected = usePicked(skaterById);
  const group = useBoardUi((s) => s.group);
  const toggleSkater = useBoardUi((s) => s.toggleSkater);
  const clearSelection = useBoardUi((s) => s.clearSelection);
  const setGroup = useBoardUi((s) => s.setGroup);
  return (
    <SkaterTiles
      skaters={skaters}
      groups={groups}
      selected={selected}
      sessionId={sessionId}
      group={group}
      onToggle={toggleSkater}
      onClear={clearSelection}
      onGroup={setGroup}
      compact={compact}
    />
  );
});

/** The line under "Cues"; it names how many a group cue goes to. */
const CuesHint = memo(function CuesHint({ skaterById }: { skaterById: ReadonlyMap<string, Skater> }) {
  const picked = useBoardUi((s) => s.selected.filter((id) => skaterById.has(id)).length);
  return (
    <Text variant="caption" tone="muted">
      Tap the cue for “needs work”, the end of the chip for “good”.
      {picked > 1 ? ` Goes to all ${picked} picked skaters.` : ''}
    </Text>
  );
});

/** Today's notes with their heading: the only part of the board that reads the whole list. */
const FeedPart = memo(function FeedPart({
  sessionId,
  skaterById,
  cueById,
  error,
  onSave,
  onDelete,
}: {
  sessionId: string;
  skaterById: Map<string, Skater>;
  cueById: Map<string, Cue>;
  error: string | null;
  onSave: (id: string, patch: ObservationPatch) => void;
  onDelete: (id: string) => void;
}) {
  const observations = useQuery({ ...observationsOnDevice(sessionId), enabled: !!sessionId }).data ?? EMPTY_OBS;
  return (
    <View style={styles.section}>
      <Heading level={2}>{`Today’s notes (${observations.length})`}</Heading>
      {error ? (
        <Banner kind="error" testID="feed-error">
          {`Change not saved: ${error}`}
        </Banner>
      ) : null}
      <NoteFeed observations={observations} skaters={skaterById} cues={cueById} onSave={onSave} onDelete={onDelete} />
    </View>
  );
});

/**
 * The bar under the board: the undo bar (or the board's notice), or on a phone with skaters picked
 * and nothing to confirm, the pick bar. Subscribes to the recorder, so a tap re-renders this bar.
 */
const BottomBar = memo(function BottomBar({
  recorder,
  sessionId,
  cueById,
  skaterById,
  namesOf,
  wide,
  compact,
  onUndo,
  onEditing,
  onSaveNote,
  onClearPick,
}: {
  recorder: RecorderStore;
  sessionId: string;
  cueById: Map<string, Cue>;
  skaterById: ReadonlyMap<string, Skater>;
  namesOf: (ids: readonly string[]) => string;
  wide: boolean;
  /** The phone's slot: with nothing to confirm, it shows who the next tap goes to. */
  compact: boolean;
  onUndo: () => void;
  onEditing: (editing: boolean) => void;
  onSaveNote: (latest: Recording, note: string, shared: boolean) => void;
  onClearPick: () => void;
}) {
  const latest = useStore(recorder, latestOf);
  const notice = useStore(recorder, (s) => s.notice);
  const selected = usePicked(skaterById);
  const latestId = latest?.ids[0];
  const noteOf = useCallback((list: Observation[]) => (latestId ? (list.find((o) => o.id === latestId) ?? null) : null), [latestId]);
  const current = useQuery({ ...observationsOnDevice(sessionId), enabled: !!sessionId && !!latestId, select: noteOf }).data ?? null;

  // The phone's slot between the tiles and the cues: who the next tap goes to.
  if (compact && !latest && !notice) {
    return (
      <View style={styles.pickBar} testID="pick-bar">
        <Text
          weight="bold"
          numberOfLines={2}
          tone={selected.length ? 'default' : 'muted'}
          style={styles.grow}
          testID="selection-summary"
        >
          {selected.length === 0
            ? 'Tap skaters, then a cue'
            : `For ${selected.length > 1 ? `all ${selected.length}: ` : ''}${namesOf(selected)}`}
        </Text>
        {selected.length > 0 ? (
          <Button
            label="Clear"
            variant="secondary"
            style={styles.slotButton}
            onPress={onClearPick}
            testID="pick-bar-clear"
            accessibilityLabel="Clear the picked skaters"
          />
        ) : null}
      </View>
    );
  }
  return (
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
              undone: latest.undone,
            }
          : null
      }
      notice={notice}
      currentNote={current?.note ?? ''}
      currentShared={current?.noteShared ?? false}
      onUndo={onUndo}
      onEditing={onEditing}
      wide={wide}
      compact={compact}
      onSaveNote={(note, shared) => {
        if (latest) onSaveNote(latest, note, shared);
      }}
    />
  );
});

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
  phoneBoard: { paddingHorizontal: spacing.xs, paddingTop: spacing.xxs, paddingBottom: spacing.xxs, gap: 6 },
  phoneTop: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, minHeight: 28, paddingHorizontal: spacing.xxs },
  phoneLibrary: { alignItems: 'flex-start' },
  phoneTiles: { flexGrow: 0, flexShrink: 0, maxHeight: PHONE_TILES_MAX_HEIGHT },
  phoneTilesContent: { paddingHorizontal: 3 },
  slot: { height: 60, flexDirection: 'row', alignItems: 'stretch', overflow: 'hidden' },
  slotOpen: { minHeight: 60, flexDirection: 'row', alignItems: 'stretch' },
  groupSwitch: { paddingHorizontal: spacing.sm },
  slotButton: { paddingVertical: spacing.xxs },
  phoneBelow: { padding: spacing.md, gap: spacing.lg, paddingBottom: spacing.xl, borderTopWidth: 1, borderTopColor: colors.divider },
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
    flex: 1,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    paddingHorizontal: spacing.sm,
    backgroundColor: colors.surfaceSunken,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.divider,
  },
  wideBar: { paddingHorizontal: spacing.lg, paddingVertical: spacing.sm, maxWidth: layout.contentMaxWidth + 400, width: '100%' },
});

