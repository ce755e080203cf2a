/**
 * The note sheet under the undo bar: it starts from the note's own sharing (the team's default
 * when the note was made), the coach can switch it, and Save hands both the text and the choice on.
 */
import { render } from '@testing-library/react-native';

import { UndoBar, type UndoBarProps } from '../../components/board/undo-bar';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb } from './web-queries';

const latest = { key: 'obs-1', cueLabel: 'Sit lower', names: 'Mia K.', mark: 'needs_work' as const, repeat: 1, count: 1 };

function renderBar(props: Partial<UndoBarProps>) {
  const onSaveNote = jest.fn();
  render(
    <UndoBar
      latest={latest}
      notice={null}
      currentNote=""
      currentShared={false}
      onUndo={jest.fn()}
      onSaveNote={onSaveNote}
      onEditing={jest.fn()}
      compact
      {...props}
    />,
  );
  return onSaveNote;
}

describe('the undo bar note sheet', () => {
  it.each([
    ['coaches only by default, switched on', false, true],
    ['shared by default, switched off', true, false],
  ])('%s', async (_name, initial, saved) => {
    const onSaveNote = renderBar({ currentShared: initial });
    await fireWeb(getByTestIdWeb('note-add'), 'onPress');
    const toggle = getByTestIdWeb('note-shared');
    expect(toggle.props['aria-checked']).toBe(initial);
    await fireWeb(toggle, 'onPress');
    await fireWeb(getByTestIdWeb('note-input'), 'onChangeText', '  Knee over toe  ');
    await fireWeb(getByTestIdWeb('note-save'), 'onPress');
    expect(onSaveNote).toHaveBeenCalledWith('Knee over toe', saved);
    expect(queryByTestIdWeb('note-shared')).toBeNull();
  });

  it('keeps the choice when the coach only edits the words', async () => {
    const onSaveNote = renderBar({ currentShared: true, currentNote: 'Old words' });
    await fireWeb(getByTestIdWeb('note-add'), 'onPress');
    await fireWeb(getByTestIdWeb('note-input'), 'onChangeText', 'New words');
    await fireWeb(getByTestIdWeb('note-save'), 'onPress');
    expect(onSaveNote).toHaveBeenCalledWith('New words', true);
  });

  it('offers no sheet once the note is undone', () => {
    renderBar({ latest: { ...latest, undone: true } });
    expect(queryByTestIdWeb('note-add')).toBeNull();
  });
});
