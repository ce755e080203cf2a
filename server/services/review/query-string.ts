/**
 * The review's query strings, one value per field. Express reads `?from=2026-W01&from=2026-W02`
 * as an array, which the schemas would refuse as "not an ISO week" although both values are
 * weeks: a field given more than once is a 400 that says so, naming the field.
 */
import type { Request } from 'express';
import { badRequest } from '../../lib/errors';

export function singleValued(query: Request['query']): Request['query'] {
  for (const [key, value] of Object.entries(query ?? {})) {
    if (Array.isArray(value)) {
      const name = key.length > 40 ? `${key.slice(0, 40)}…` : key;
      const message = `${name} is given ${value.length} times: give it once`;
      throw badRequest(message, { [name]: message });
    }
  }
  return query;
}
