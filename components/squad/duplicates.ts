/**
 * Names the head coach would confuse, caught before anything is sent: a second skater or group
 * with a name the team already has (compared by shared/names.ts: trimmed, NFC, any letter case;
 * retired skaters included). The words are the ones the server puts on the field with its 409.
 */
import { duplicateGroupMessage, duplicateSkaterMessage, findDuplicateGroupName, findDuplicateName } from '../../shared/names';
import type { Group, Skater } from '../../shared/schemas';

/** Why a skater name is refused (the field's line), or null when it is free. */
export function skaterNameProblem(skaters: readonly Skater[], name: string, exceptId?: string): string | null {
  const twin = findDuplicateName(skaters, name, exceptId);
  return twin ? duplicateSkaterMessage(twin).field : null;
}

/** Why a group name is refused (the field's line), or null when it is free. */
export function groupNameProblem(groups: readonly Group[], name: string): string | null {
  const twin = findDuplicateGroupName(groups, name);
  return twin ? duplicateGroupMessage(twin).field : null;
}
