/** TextField shows its error under the field and marks the input invalid. */
import { render } from '@testing-library/react-native';

import { TextField } from '../../components/ui/text-field';
import { getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

describe('TextField', () => {
  it('shows the error message under the field', () => {
    render(<TextField label="E-mail" testID="probe" value="" onChangeText={() => undefined} error="Enter a valid e-mail address" />);
    expect(textOf(getByTestIdWeb('probe-error'))).toContain('Enter a valid e-mail address');
    // The input is named by its label for screen readers, and points at the message.
    const input = getByTestIdWeb('probe');
    expect(input.props['aria-label']).toBe('E-mail');
    expect(input.props['aria-invalid']).toBe(true);
  });

  it('shows the hint when there is no error', () => {
    render(<TextField label="Password" testID="probe" value="" onChangeText={() => undefined} hint="At least 8 characters." />);
    expect(textOf(getByTestIdWeb('probe-hint'))).toContain('At least 8 characters.');
    expect(queryByTestIdWeb('probe-error')).toBeNull();
  });
});
