/**
 * A skater's target and pace plan (jest-expo/web): even pace saves the time alone; even after an
 * opener saves the opener; section shares filled from the example profile (Wiersma et al. 2017,
 * elite junior men's 1500 m: 22.1 / 24.6 / 26.2 % as published, the last lap the remainder 27.1 %)
 * save as shares; shares that do not sum to 100 are refused with the reason and nothing is saved;
 * the planned splits are shown before saving.
 */
import { render, waitFor } from '@testing-library/react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { TargetEditor } from '../../components/clock/target-editor';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

const ANNA = '0190a0b0-0000-7000-8000-0000000000a1';

function renderEditor(distanceM = 1500) {
  const onSave = jest.fn(async () => undefined);
  const onClose = jest.fn();
  render(
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 390, height: 844 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <TargetEditor skaterId={ANNA} skaterName="Anna Reede" distanceM={distanceM} track="long" onSave={onSave} onClose={onClose} />
    </SafeAreaProvider>,
  );
  return { onSave, onClose };
}

const type = (id: string, value: string) => fireWeb(getByTestIdWeb(id), 'onChangeText', value);
const press = (id: string) => fireWeb(getByTestIdWeb(id), 'onPress');

describe('TargetEditor', () => {
  it('even pace: shows the planned splits and saves the time alone', async () => {
    const { onSave, onClose } = renderEditor();
    await type('target-time', '1:58.00');
    // 1:58.00 shared per metre: 300 m = 23.60, then 31.46(6) per 400 m.
    expect(textOf(getByTestIdWeb('target-preview'))).toContain('23.60');
    expect(textOf(getByTestIdWeb('target-preview'))).toContain('1:58.00');
    await press('target-save');
    expect(onSave).toHaveBeenCalledWith({ skaterId: ANNA, track: 'long', distanceM: 1500, targetMs: 118_000, plan: 'even', openerMs: null, sharesPct: null });
    await waitFor(() => expect(onClose).toHaveBeenCalled());
  });

  it('even after an opener: saves the opener with the target', async () => {
    const { onSave } = renderEditor();
    await type('target-time', '1:58.00');
    await press('target-plan-opener');
    await press('target-save');
    expect(onSave).not.toHaveBeenCalled();
    expect(textOf(getByTestIdWeb('target-error'))).toContain('Give the opener time');
    await type('target-opener', '25.00');
    await press('target-save');
    expect(onSave).toHaveBeenCalledWith(expect.objectContaining({ plan: 'even', openerMs: 25_000, sharesPct: null, targetMs: 118_000 }));
  });

  it('section shares: the example profile with its source, and a sum that is not 100 refused', async () => {
    const { onSave } = renderEditor();
    await type('target-time', '1:57.00');
    await press('target-plan-shares');
    await press('target-shares-example');
    expect(textOf(getByTestIdWeb('target-shares-source'))).toContain('Wiersma et al. 2017');
    expect(textOf(getByTestIdWeb('target-shares-sum'))).toBe('Sum: 100 % (must be 100)');
    await type('target-share-3', '27');
    expect(textOf(getByTestIdWeb('target-shares-sum'))).toBe('Sum: 99.9 % (must be 100)');
    await press('target-save');
    expect(onSave).not.toHaveBeenCalled();
    expect(textOf(getByTestIdWeb('target-error'))).toMatch(/sum to 100/);
    await type('target-share-3', '27.1');
    await press('target-save');
    expect(onSave).toHaveBeenCalledWith(expect.objectContaining({ plan: 'shares', openerMs: null, sharesPct: [22.1, 24.6, 26.2, 27.1], targetMs: 117_000 }));
  });

  it('offers the example only on 1500 m long track', async () => {
    renderEditor(1000);
    await press('target-plan-shares');
    expect(queryByTestIdWeb('target-shares-example')).toBeNull();
    // 1000 m = 200 m opener + 2 laps: three shares.
    expect(queryByTestIdWeb('target-share-2')).not.toBeNull();
    expect(queryByTestIdWeb('target-share-3')).toBeNull();
  });
});
