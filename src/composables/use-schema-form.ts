import { computed, reactive, ref, toValue, type MaybeRefOrGetter } from 'vue';
import type { z } from 'zod';
import type { FieldErrors } from '@shared/errors';
import { ApiRequestError } from '@/api/errors';

/** The first message per dotted field path of a failed zod parse. */
export function issuesToFields(issues: readonly { path: readonly PropertyKey[]; message: string }[]): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of issues) {
    const key = issue.path.map(String).join('.') || '_form';
    if (!(key in fields)) fields[key] = issue.message;
  }
  return fields;
}

/**
 * Inline validation of a form with a zod schema shared with the server (shared/schemas).
 * A field shows its message once it was left (blur) or the form was submitted; messages the server sent in
 * `fields` show under the same inputs until the field is edited.
 * `values` is a getter, ref or computed of the body as the schema expects it (or a reactive object).
 */
export function useSchemaForm<S extends z.ZodType>(schema: S, values: MaybeRefOrGetter<unknown>) {
  const touched = reactive<Record<string, boolean>>({});
  const submitted = ref(false);
  const serverFields = ref<FieldErrors>({});
  /** A message for the whole form (wrong password, server not reachable...). */
  const formError = ref<string | null>(null);

  const clientFields = computed<FieldErrors>(() => {
    const result = schema.safeParse(toValue(values));
    return result.success ? {} : issuesToFields(result.error.issues);
  });

  function errorFor(field: string): string | undefined {
    if (serverFields.value[field]) return serverFields.value[field];
    if (submitted.value || touched[field]) return clientFields.value[field];
    return undefined;
  }

  function touch(field: string): void {
    touched[field] = true;
  }

  /** Call on input: a server message about this field no longer applies once it is edited. */
  function edited(field: string): void {
    if (serverFields.value[field]) {
      const rest = { ...serverFields.value };
      delete rest[field];
      serverFields.value = rest;
    }
    formError.value = null;
  }

  /** Marks the form submitted and returns the parsed body, or null when a field is invalid. */
  function validate(): z.output<S> | null {
    submitted.value = true;
    formError.value = null;
    const result = schema.safeParse(toValue(values));
    return result.success ? result.data : null;
  }

  /** Shows a failed submit: field messages under their inputs, anything else above the submit button. */
  function showServerError(error: unknown, fallback = 'That did not work. Try again in a moment.'): void {
    if (error instanceof ApiRequestError) {
      serverFields.value = { ...error.fields };
      const fieldCount = Object.keys(error.fields).length;
      formError.value = fieldCount > 0 && error.code === 'VALIDATION_FAILED' ? null : error.message;
    } else {
      formError.value = fallback;
    }
  }

  function reset(): void {
    submitted.value = false;
    serverFields.value = {};
    formError.value = null;
    for (const key of Object.keys(touched)) delete touched[key];
  }

  return { errorFor, touch, edited, validate, showServerError, reset, formError, submitted };
}
