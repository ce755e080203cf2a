/**
 * The note box used by the undo bar and the feed's edit panel: a multi-line field with a running
 * count against NOTE_MAX and a plain message once the note is too long (saving is then refused).
 */
import { NOTE_MAX } from '../../shared/schemas';
import { TextField } from '../ui';

export const noteTooLong = (text: string) => text.trim().length > NOTE_MAX;

export function NoteField({
  value,
  onChange,
  testID,
  label = 'Note',
  autoFocus,
}: {
  value: string;
  onChange: (text: string) => void;
  testID: string;
  label?: string;
  autoFocus?: boolean;
}) {
  const length = value.trim().length;
  const over = length - NOTE_MAX;
  return (
    <TextField
      label={label}
      testID={testID}
      value={value}
      onChangeText={onChange}
      multiline
      numberOfLines={3}
      autoFocus={autoFocus}
      placeholder="What did you see? (optional)"
      hint={`${length} / ${NOTE_MAX} characters`}
      error={over > 0 ? `Too long: ${length} / ${NOTE_MAX} characters. Remove ${over} to save.` : null}
    />
  );
}
