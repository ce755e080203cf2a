/**
 * What the benches share: the bench server's address, one JSON call to its API, and the
 * quantile every bench reports its p50/p95 with.
 */

/** The bench server (scripts/bench.sh starts it and sets BENCH_BASE_URL). */
export const BASE = process.env.BENCH_BASE_URL ?? 'http://127.0.0.1:8434';

/**
 * A JSON call to the bench server: POST when there is a body, GET otherwise, as the coach whose
 * token is given. Anything but a 2xx throws with the path, the status and the answer's text.
 */
export async function api<T>(path: string, body?: unknown, token?: string): Promise<T> {
  const response = await fetch(`${BASE}${path}`, {
    method: body === undefined ? 'GET' : 'POST',
    headers: { 'content-type': 'application/json', origin: BASE, ...(token ? { authorization: `Bearer ${token}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!response.ok) throw new Error(`${path}: ${response.status} ${await response.text()}`);
  return response.json() as Promise<T>;
}

/** The value at quantile q (0..1) of the values: the nearest rank at or above, never interpolated. */
export const quantile = (values: number[], q: number) => {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];
};
