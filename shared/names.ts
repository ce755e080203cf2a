/**
 * Names that must tell people, groups and cues apart. Two names are the same when their keys are:
 * trimmed, in Unicode NFC ("é" typed as one letter or as "e" + accent is one letter) and
 * lower-cased. The server's unique indexes use the same key (server/migrations
 * 1764740000000-squad-management.ts: lower(normalize(name, NFC)) under ICU's root locale), so a
 * form that checks with these helpers first says what the server would answer, offline too, in
 * the same words.
 */

/** The key two names are compared by. */
export const nameKey = (name: string): string => name.trim().normalize('NFC').toLowerCase();

export const sameName = (a: string, b: string): boolean => nameKey(a) === nameKey(b);

/** The first item whose name has the same key as `name`, leaving out `exceptId` (the item being renamed). */
function findByName<T extends { id: string }>(items: readonly T[], nameOf: (item: T) => string, name: string, exceptId?: string): T | undefined {
  const wanted = nameKey(name);
  if (wanted === '') return undefined;
  return items.find((item) => item.id !== exceptId && nameKey(nameOf(item)) === wanted);
}

/**
 * The skater of the team who already has this name, retired ones included (a retired skater keeps
 * their name: bring them back instead of adding them again), or undefined.
 */
export const findDuplicateName = <T extends { id: string; displayName: string }>(skaters: readonly T[], displayName: string, exceptId?: string) =>
  findByName(skaters, (s) => s.displayName, displayName, exceptId);

/** The group of the team that already has this name, or undefined. */
export const findDuplicateGroupName = <T extends { id: string; name: string }>(groups: readonly T[], name: string, exceptId?: string) =>
  findByName(groups, (g) => g.name, name, exceptId);

/** What the server and the forms say when a skater's name is taken (the whole sentence and the field's line). */
export function duplicateSkaterMessage(existing: { displayName: string; retired: boolean }): { message: string; field: string } {
  return existing.retired
    ? {
        message: `There is already a retired skater called “${existing.displayName}” in this team: bring them back from the retired list, or add an initial or a second name to tell them apart.`,
        field: `A retired skater is called “${existing.displayName}”: bring them back, or add an initial`,
      }
    : {
        message: `There is already a skater called “${existing.displayName}” in this team. Add an initial or a second name to tell them apart.`,
        field: `“${existing.displayName}” is in the squad already: add an initial or a second name`,
      };
}

/** What the server and the forms say when a group's name is taken. */
export function duplicateGroupMessage(existing: { name: string }): { message: string; field: string } {
  return {
    message: `There is already a group called “${existing.name}” in this team. Pick another name.`,
    field: `“${existing.name}” exists already: pick another name`,
  };
}
