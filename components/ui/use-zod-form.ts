/**
 * useZodForm: tiny form state for the shared zod schemas, so the client shows exactly the messages
 * the server would send. A field is checked when it loses focus and on submit; once a field has
 * shown an error it re-checks as you type, so the message goes away the moment it is fixed.
 * Server errors land next to the field named in `error.fields`, or in a form-level banner.
 */
import { useCallback, useRef, useState } from 'react';
import type { z } from 'zod';

type Issue = { path: PropertyKey[]; message: string };

/** The parts of an API error the form needs (kept structural so the UI kit does not import store/). */
export type FieldErrorSource = { message: string; fields?: Record<string, string> };

export function useZodForm<K extends string, Out>(schema: z.ZodType<Out>, initial: Record<K, string>) {
  const [values, setValues] = useState<Record<K, string>>(initial);
  const [errors, setErrors] = useState<Partial<Record<K, string>>>({});
  const [formError, setFormError] = useState<string | null>(null);
  // Fields that have been left once (or the form submitted): only those show messages, so a
  // half-typed e-mail is not shouted at while the coach is still typing it.
  const touched = useRef(new Set<K>());
  const valuesRef = useRef(values);
  valuesRef.current = values;

  const keys = Object.keys(initial) as K[];

  const issuesFor = useCallback(
    (next: Record<K, string>) => {
      const result = schema.safeParse(next);
      const byField: Partial<Record<K, string>> = {};
      const other: string[] = [];
      if (!result.success) {
        for (const issue of result.error.issues as Issue[]) {
          const key = String(issue.path[0] ?? '') as K;
          if (keys.includes(key)) {
            if (!(key in byField)) byField[key] = issue.message;
          } else {
            other.push(issue.message);
          }
        }
      }
      return { ok: result.success, data: result.success ? result.data : undefined, byField, other };
    },
    // keys come from `initial`, which callers keep stable for the life of the form.
    [schema],
  );

  const checkField = useCallback(
    (key: K, next: Record<K, string>) => {
      const { byField } = issuesFor(next);
      setErrors((prev) => ({ ...prev, [key]: byField[key] }));
    },
    [issuesFor],
  );

  const setValue = useCallback(
    (key: K, value: string) => {
      const next = { ...valuesRef.current, [key]: value };
      valuesRef.current = next;
      setValues(next);
      if (touched.current.has(key)) checkField(key, next);
    },
    [checkField],
  );

  const blur = useCallback(
    (key: K) => {
      touched.current.add(key);
      checkField(key, valuesRef.current);
    },
    [checkField],
  );

  // A submit while the previous one is still being saved does nothing: a gloved double tap on a
  // form's button sends it once.
  const inFlight = useRef(false);

  /**
   * Validates everything; calls onValid with the parsed (trimmed, lower-cased...) data if valid.
   * Ignored while an earlier submit's onValid has not settled.
   */
  const submit = useCallback(
    async (onValid: (data: Out) => Promise<unknown> | unknown) => {
      if (inFlight.current) return;
      inFlight.current = true;
      try {
        for (const key of keys) touched.current.add(key);
        setFormError(null);
        const { ok, data, byField, other } = issuesFor(valuesRef.current);
        setErrors(byField);
        if (!ok) {
          if (other.length > 0) setFormError(other[0]);
          return;
        }
        await onValid(data as Out);
      } finally {
        inFlight.current = false;
      }
    },
    [issuesFor],
  );

  /** Shows a server error beside its field(s); anything not tied to a visible field goes to the banner. */
  const applyServerError = useCallback((error: FieldErrorSource) => {
    const fieldErrors: Partial<Record<K, string>> = {};
    const leftovers: string[] = [];
    for (const [key, message] of Object.entries(error.fields ?? {})) {
      if (keys.includes(key as K)) fieldErrors[key as K] = message;
      else leftovers.push(message);
    }
    setErrors(fieldErrors);
    const placed = Object.keys(fieldErrors).length > 0;
    setFormError(leftovers[0] ?? (placed ? null : error.message));
  }, []);

  /** Props to spread on a TextField: value, change, blur and the field's message. */
  const field = (key: K) => ({
    value: values[key],
    onChangeText: (text: string) => setValue(key, text),
    onBlur: () => blur(key),
    error: errors[key] ?? null,
  });

  return {
    values,
    errors,
    formError,
    setFormError,
    setValue,
    blur,
    submit,
    applyServerError,
    field,
    reset: () => {
      touched.current.clear();
      valuesRef.current = initial;
      setValues(initial);
      setErrors({});
      setFormError(null);
    },
  };
}
