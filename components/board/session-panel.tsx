/**
 * Today's session: the day, the rink and an optional title, and up to six focus cues pinned to
 * the top of the chips. Folded to one line by default so it never pushes the tiles down; pins
 * save with each tap, rink and title with Save.
 */
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { phaseLabels, phases } from '../../shared/cues';
import type { BoardSession, BoardSessionPatch, Cue } from '../../shared/schemas';
import { Banner, Button, Card, Text, TextField, ToggleRow, spacing } from '../ui';
import { ShareDefaultSwitch } from './share-default-switch';
import { formatDay, plural } from './format';

export const FOCUS_MAX = 6;

export type SessionPanelProps = {
  session: BoardSession;
  cues: Cue[];
  error: string | null;
  saving: boolean;
  onSave: (patch: BoardSessionPatch) => void;
};

export function SessionPanel({ session, cues, error, saving, onSave }: SessionPanelProps) {
  const [open, setOpen] = useState(false);
  const [rink, setRink] = useState(session.rink);
  const [title, setTitle] = useState(session.title);
  // Pins save with each tap; the local list keeps quick taps from overwriting each other while
  // earlier saves are still on their way, and follows the session again once they are done.
  const [pins, setPins] = useState(session.focusCueIds);
  const saved = JSON.stringify(session.focusCueIds);
  useEffect(() => {
    if (!saving) setPins(JSON.parse(saved) as string[]);
  }, [saved, saving]);
  const live = cues.filter((c) => !c.archived);
  const pinned = pins.filter((id) => live.some((c) => c.id === id));
  const full = pinned.length >= FOCUS_MAX;

  const summary = [session.title, session.rink || 'No rink set', plural(pinned.length, 'focus cue', 'focus cues')].filter(Boolean).join(' · ');

  const togglePin = (id: string, on: boolean) => {
    const next = on ? [...pinned, id] : pinned.filter((x) => x !== id);
    setPins(next);
    onSave({ focusCueIds: next });
  };

  return (
    <Card testID="session-panel" style={styles.card}>
      <View style={styles.head}>
        <View style={styles.grow}>
          <Text weight="bold">{`Session \u00B7 ${formatDay(session.day)}`}</Text>
          <Text variant="caption" tone="muted" numberOfLines={2} testID="session-summary">
            {summary}
          </Text>
        </View>
        <Button
          label={open ? 'Close' : 'Edit session'}
          variant="secondary"
          onPress={() => {
            setRink(session.rink);
            setTitle(session.title);
            setOpen(!open);
          }}
          testID={open ? 'session-close' : 'session-edit'}
          accessibilityHint="Rink, title and today's focus cues"
        />
      </View>
      {error ? (
        <Banner kind="error" testID="session-error">
          {error}
        </Banner>
      ) : null}
      {open ? (
        <View style={styles.body}>
          <ShareDefaultSwitch />
          <TextField label="Rink" value={rink} onChangeText={setRink} maxLength={80} placeholder="Which rink or oval?" testID="session-rink" />
          <TextField label="Title (optional)" value={title} onChangeText={setTitle} maxLength={80} placeholder="e.g. Tempo laps, starts" testID="session-title" />
          <Button
            label="Save rink and title"
            loading={saving}
            onPress={() => onSave({ rink: rink.trim(), title: title.trim() })}
            testID="session-save"
            style={styles.save}
          />
          <Text weight="bold" accessibilityRole="header">
            Focus cues ({pinned.length} of {FOCUS_MAX})
          </Text>
          <Text variant="caption" tone="muted">
            Pinned cues sit first on the board today. Each tap saves.{full ? ' All six are pinned: unpin one to pin another.' : ''}
          </Text>
          {phases.map((phase) => {
            const inPhase = live.filter((c) => c.phase === phase).sort((a, b) => a.sortOrder - b.sortOrder);
            if (inPhase.length === 0) return null;
            return (
              <View key={phase} style={styles.phase}>
                <Text variant="caption" weight="bold" tone="muted">
                  {phaseLabels[phase].toUpperCase()}
                </Text>
                {inPhase.map((cue) => {
                  const on = pinned.includes(cue.id);
                  return (
                    <ToggleRow
                      key={cue.id}
                      label={cue.label}
                      value={on}
                      disabled={!on && full}
                      onChange={(next) => togglePin(cue.id, next)}
                      testID={`focus-pin-${cue.id}`}
                    />
                  );
                })}
              </View>
            );
          })}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  card: { padding: spacing.md, gap: spacing.sm },
  head: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  grow: { flexGrow: 1, flexBasis: 160 },
  body: { gap: spacing.sm },
  save: { alignSelf: 'flex-start' },
  phase: { gap: 0 },
});
