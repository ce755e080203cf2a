/**
 * Names that tell people, groups and cues apart (shared/names.ts, shared/cues.ts): compared after
 * trim, NFC and lower-casing, like the server's unique indexes; retired skaters and archived cues
 * count; the item being renamed does not; the default library and the demo club have no
 * duplicates; the schemas store names in NFC.
 */
import { defaultCueList, duplicateCueMessage, findDuplicateCueLabel, phases } from '../../shared/cues';
import { duplicateGroupMessage, duplicateSkaterMessage, findDuplicateGroupName, findDuplicateName, nameKey, sameName } from '../../shared/names';
import { cueLabelSchema } from '../../shared/cues';
import { displayNameSchema } from '../../shared/schemas';
import { demoGroups, demoSkaters } from '../../server/seed/demo';

const composedE = '\u00e9'; // é as one code point
const decomposedE = 'e\u0301'; // e + combining acute accent

describe('nameKey', () => {
  it.each([
    ['Mia K.', 'mia k.'],
    ['  Mia K. ', 'MIA K.'],
    [`${composedE}lodie`, `${decomposedE}lodie`],
    ['ÉLODIE', 'élodie'],
    ['ÆRØSKØBING', 'ærøskøbing'],
    ['ΣΟΦΊΑ', 'σοφία'],
  ])('%s and %s are the same name', (a, b) => {
    expect(sameName(a, b)).toBe(true);
  });

  it.each([
    ['Mia K.', 'Mia K'],
    ['Mia K.', 'Mia Ko.'],
    ['Elodie', 'Élodie'],
    ['ليلى', 'ليلي'],
  ])('%s and %s are different names', (a, b) => {
    expect(sameName(a, b)).toBe(false);
  });

  it('keeps emoji and right-to-left letters as they are', () => {
    expect(nameKey(' 🚀 Noor ')).toBe('🚀 noor');
    expect(nameKey('ليلى')).toBe('ليلى');
  });
});

describe('findDuplicateName (skaters)', () => {
  const squad = [
    { id: 'a', displayName: 'Mia K.', retired: false },
    { id: 'b', displayName: 'Noor Vliet', retired: true },
  ];

  it('finds a live or a retired skater with the same name, any case, any spacing at the ends', () => {
    expect(findDuplicateName(squad, ' mia k. ')).toBe(squad[0]);
    expect(findDuplicateName(squad, 'NOOR VLIET')).toBe(squad[1]);
    expect(findDuplicateName(squad, 'Mia Ko.')).toBeUndefined();
    expect(findDuplicateName(squad, '   ')).toBeUndefined();
  });

  it('leaves out the skater being renamed (a change of case is not a duplicate)', () => {
    expect(findDuplicateName(squad, 'MIA K.', 'a')).toBeUndefined();
    expect(findDuplicateName(squad, 'Noor Vliet', 'a')).toBe(squad[1]);
  });

  it('says what to do, differently for a retired skater', () => {
    expect(duplicateSkaterMessage({ displayName: 'Mia K.', retired: false }).message).toBe(
      'There is already a skater called “Mia K.” in this team. Add an initial or a second name to tell them apart.',
    );
    expect(duplicateSkaterMessage({ displayName: 'Mia K.', retired: true }).message).toMatch(
      /^There is already a retired skater called “Mia K\.” in this team: bring them back from the retired list, or add an initial/,
    );
  });
});

describe('findDuplicateGroupName', () => {
  it('finds a group with the same name and leaves out the one being renamed', () => {
    const groups = [{ id: 'g1', name: 'Juniors A' }, { id: 'g2', name: 'Seniors' }];
    expect(findDuplicateGroupName(groups, 'juniors a')).toBe(groups[0]);
    expect(findDuplicateGroupName(groups, 'JUNIORS A', 'g1')).toBeUndefined();
    expect(duplicateGroupMessage(groups[1]).message).toBe('There is already a group called “Seniors” in this team. Pick another name.');
  });
});

describe('findDuplicateCueLabel', () => {
  const cues = [
    { id: 'c1', phase: 'curve' as const, label: 'Hug the blocks', archived: false },
    { id: 'c2', phase: 'curve' as const, label: 'Stay low', archived: true },
    { id: 'c3', phase: 'straight' as const, label: 'Longer glide', archived: false },
  ];

  it('finds a label in the same phase only, archived cues included', () => {
    expect(findDuplicateCueLabel(cues, 'curve', 'hug THE blocks ')).toBe(cues[0]);
    expect(findDuplicateCueLabel(cues, 'curve', 'Stay low')).toBe(cues[1]);
    expect(findDuplicateCueLabel(cues, 'straight', 'Hug the blocks')).toBeUndefined();
    expect(findDuplicateCueLabel(cues, 'curve', 'Hug the blocks', 'c1')).toBeUndefined();
  });

  it('names the phase and offers an archived cue back', () => {
    expect(duplicateCueMessage(cues[0])).toBe('A cue called “Hug the blocks” exists already in this phase (Curve).');
    expect(duplicateCueMessage(cues[1])).toBe(
      'An archived cue called “Stay low” exists already in this phase (Curve): bring it back from the archive instead of adding it again.',
    );
  });
});

describe('the data a team starts with has no duplicates', () => {
  it('the default cue library: no label twice in a phase', () => {
    for (const phase of phases) {
      const keys = defaultCueList.filter((c) => c.phase === phase).map((c) => nameKey(c.label));
      expect({ phase, count: new Set(keys).size }).toEqual({ phase, count: keys.length });
    }
  });

  it('the demo club: no skater or group name twice', () => {
    const skaters = demoSkaters.map((s) => nameKey(s.displayName));
    const groups = demoGroups.map((g) => nameKey(g.name));
    expect(new Set(skaters).size).toBe(skaters.length);
    expect(new Set(groups).size).toBe(groups.length);
  });
});

describe('names are stored in NFC', () => {
  it('displayNameSchema and cueLabelSchema compose accents', () => {
    expect(displayNameSchema.parse(` ${decomposedE}lodie `)).toBe(`${composedE}lodie`);
    expect(cueLabelSchema.parse(`Caf${decomposedE} glide`)).toBe(`Caf${composedE} glide`);
  });
});
