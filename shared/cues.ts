/**
 * The cue library's phases and the default library a new team starts with: about thirty short
 * technique cues in the trade's plain terms, in Boardside's own wording. A head coach can add,
 * rename, reorder and archive cues; archived cues keep their history.
 */
import { z } from 'zod';
import { nameKey } from './names';
import { isSafeText } from './schemas/values';

export const phases = ['start', 'opening', 'straight', 'curve', 'exit', 'pacing'] as const;
export const phaseSchema = z.enum(phases, { error: `Phase must be one of: ${phases.join(', ')}` });
export type Phase = z.infer<typeof phaseSchema>;

export const phaseLabels: Record<Phase, string> = {
  start: 'Start',
  opening: 'Opening strokes',
  straight: 'Straight',
  curve: 'Curve',
  exit: 'Curve exit',
  pacing: 'Pacing',
};

export const CUE_LABEL_MAX = 60;

export const cueLabelSchema = z
  .string({ error: 'Cue text is required' })
  .trim()
  // One form of each accented letter, so the unique label per phase cannot be dodged (shared/names.ts).
  .normalize('NFC')
  .min(2, 'Cue text must be at least 2 characters')
  .max(CUE_LABEL_MAX, `Cue text must be at most ${CUE_LABEL_MAX} characters`)
  .refine(isSafeText, { error: 'Cue text cannot hold control characters or broken Unicode' });

export const defaultCues: Record<Phase, string[]> = {
  start: ['Sit lower in the set', 'Weight over the front blade', 'Still at "ready"', 'Explode on the gun', 'Arms drive the first steps'],
  opening: ['Short, quick strokes', 'Stay low out of the start', 'Push to the side, not back', 'Build into glide', 'Eyes up the lane'],
  straight: [
    'Deeper knee bend',
    'Full push to the side',
    'Set down under the hip',
    'Flat back, quiet shoulders',
    'Longer glide',
    'Bring the leg back under',
  ],
  curve: [
    'Lean in from the ankle',
    'Crossover under the body',
    'Right leg pushes under',
    'Head level in the curve',
    'Hug the blocks',
    'Stay low, do not stand up',
  ],
  exit: ['Accelerate out of the curve', 'Long first stroke off the curve', 'Stay low onto the straight', 'Straight line out of the exit'],
  pacing: ['Opener too hot', 'Even laps', 'Hold the lap time', 'Relax the shoulders late', 'Race through the line'],
};

/** The default library flattened in display order. */
export const defaultCueList = phases.flatMap((phase) =>
  defaultCues[phase].map((label, index) => ({ phase, label, sortOrder: index + 1 })),
);

/**
 * The cue of the phase that already has this label (compared like names: trimmed, NFC, any case),
 * archived cues included (they can be brought back, and the server counts them), leaving out
 * `exceptId` (the cue being renamed); undefined when the label is free.
 */
export function findDuplicateCueLabel<T extends { id: string; phase: Phase; label: string }>(
  cues: readonly T[],
  phase: Phase,
  label: string,
  exceptId?: string,
): T | undefined {
  const wanted = nameKey(label);
  if (wanted === '') return undefined;
  return cues.find((cue) => cue.id !== exceptId && cue.phase === phase && nameKey(cue.label) === wanted);
}

/** What the server (a refused push) and the cue library say when a label is taken in its phase. */
export function duplicateCueMessage(existing: { label: string; phase: Phase; archived: boolean }): string {
  const where = `in this phase (${phaseLabels[existing.phase]})`;
  return existing.archived
    ? `An archived cue called “${existing.label}” exists already ${where}: bring it back from the archive instead of adding it again.`
    : `A cue called “${existing.label}” exists already ${where}.`;
}
