/**
 * A minimal stand-in for fetch's Response: jsdom (the jest-expo/web environment) has no Response,
 * and the API client only reads status, ok and text().
 */
export function fakeResponse(status: number, body?: unknown) {
  const text = body === undefined ? '' : JSON.stringify(body);
  return {
    status,
    ok: status >= 200 && status < 300,
    headers: { get: (name: string) => (name.toLowerCase() === 'content-type' ? 'application/json' : null) },
    text: async () => text,
    json: async () => JSON.parse(text),
  } as unknown as Response;
}
