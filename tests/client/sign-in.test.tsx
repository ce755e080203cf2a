/**
 * The sign-in form validates with the shared zod schema on blur and on submit, and puts a server
 * error (no field named) into a banner. fetch is mocked; expo-router's Link is stubbed because
 * the screen is rendered outside a router here. Queries and events go through ./web-queries
 * (react-native-web host elements carry data-testid).
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { render, waitFor } from '@testing-library/react-native';
import type { ReactNode } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { SignInScreen } from '../../components/auth/sign-in-screen';
import { resetSessionForTests, useSession } from '../../store/session';
import { fakeResponse } from './fake-fetch';
import { fireWeb, getByTestIdWeb, queryByTestIdWeb, textOf } from './web-queries';

jest.mock('expo-router', () => {
  const { Text } = jest.requireActual('react-native-web');
  return {
    Link: ({ children, testID }: { children: ReactNode; testID?: string }) => <Text testID={testID}>{children}</Text>,
    useRouter: () => ({ replace: jest.fn(), push: jest.fn() }),
  };
});

function renderScreen() {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  return render(
    // Fixed metrics: jsdom has no layout, so the provider would otherwise render nothing.
    <SafeAreaProvider initialMetrics={{ frame: { x: 0, y: 0, width: 390, height: 844 }, insets: { top: 0, left: 0, right: 0, bottom: 0 } }}>
      <QueryClientProvider client={client}>
        <SignInScreen />
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
}

const jsonResponse = (status: number, body: unknown) => Promise.resolve(fakeResponse(status, body));

describe('SignInScreen', () => {
  const fetchMock = jest.fn();

  beforeEach(() => {
    resetSessionForTests();
    fetchMock.mockReset();
    global.fetch = fetchMock as unknown as typeof fetch;
  });

  it('shows the schema message for a bad e-mail when the field is left', async () => {
    renderScreen();
    await fireWeb(getByTestIdWeb('sign-in-email'), 'onChangeText', 'not-an-address');
    await fireWeb(getByTestIdWeb('sign-in-email'), 'onBlur', { nativeEvent: {} });
    expect(textOf(getByTestIdWeb('sign-in-email-error'))).toContain('Enter a valid e-mail address');
  });

  it('does not call the server when the form is invalid', async () => {
    renderScreen();
    await fireWeb(getByTestIdWeb('sign-in-submit'), 'onPress');
    await waitFor(() => getByTestIdWeb('sign-in-email-error'));
    expect(textOf(getByTestIdWeb('sign-in-email-error'))).toContain('E-mail is required');
    expect(textOf(getByTestIdWeb('sign-in-password-error'))).toContain('Password is required');
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('shows a refused sign-in in a banner and stays signed out', async () => {
    fetchMock.mockImplementation(() =>
      jsonResponse(401, { error: { code: 'invalid_credentials', message: 'Wrong e-mail or password.' } }),
    );
    renderScreen();
    await fireWeb(getByTestIdWeb('sign-in-email'), 'onChangeText', 'Coach@Example.org ');
    await fireWeb(getByTestIdWeb('sign-in-password'), 'onChangeText', 'whatever1');
    await fireWeb(getByTestIdWeb('sign-in-submit'), 'onPress');

    await waitFor(() => getByTestIdWeb('sign-in-error'));
    expect(textOf(getByTestIdWeb('sign-in-error'))).toContain('Wrong e-mail or password.');
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/auth/sign-in');
    // The schema trims and lower-cases the e-mail before it is sent.
    expect(JSON.parse(init.body)).toEqual({ email: 'coach@example.org', password: 'whatever1' });
    expect(init.credentials).toBe('include');
    expect(useSession.getState().status).toBe('loading');
  });

  it('puts a server field error next to its field', async () => {
    fetchMock.mockImplementation(() =>
      jsonResponse(400, { error: { code: 'validation', message: 'Invalid input', fields: { email: 'Unknown domain' } } }),
    );
    renderScreen();
    await fireWeb(getByTestIdWeb('sign-in-email'), 'onChangeText', 'a@b.co');
    await fireWeb(getByTestIdWeb('sign-in-password'), 'onChangeText', 'x');
    await fireWeb(getByTestIdWeb('sign-in-submit'), 'onPress');
    await waitFor(() => expect(textOf(getByTestIdWeb('sign-in-email-error'))).toContain('Unknown domain'));
    expect(queryByTestIdWeb('sign-in-error')).toBeNull();
  });
});
