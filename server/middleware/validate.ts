/**
 * `validate(schema)`: parses the JSON body with a zod schema from `shared/schemas/` and puts the parsed
 * (trimmed, defaulted) value in `req.body`; otherwise 400 VALIDATION_FAILED with one message per field.
 * The handler after it in the same route sees `req.body` typed as the schema's output.
 */
import type { RequestHandler } from 'express';
import type { ParamsDictionary } from 'express-serve-static-core';
import type { z } from 'zod';
import type { FieldErrors } from '../../shared/errors';
import { ApiError } from '../http/errors';

/** One message per dotted field path (the first issue wins); form-level issues go under `_`. */
export function fieldErrors(error: z.ZodError): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length > 0 ? issue.path.map(String).join('.') : '_';
    if (!(key in fields)) {
      fields[key] = issue.code === 'unrecognized_keys' ? `Remove the unknown field(s): ${issue.keys.join(', ')}.` : issue.message;
    }
  }
  return fields;
}

/** Builds the 400 VALIDATION_FAILED error for a failed parse. */
export function validationError(error: z.ZodError): ApiError {
  const fields = fieldErrors(error);
  const names = Object.keys(fields).filter((k) => k !== '_');
  const message =
    names.length > 0
      ? `Check ${names.length === 1 ? 'this field' : 'these fields'}: ${names.join(', ')}. ${fields[names[0]]}`
      : (fields._ ?? 'The request body is not what this endpoint expects.');
  return new ApiError('VALIDATION_FAILED', message, fields);
}

/** Middleware that replaces `req.body` by its parse with `schema`; its type carries the parsed body to the next handler. */
export function validate<S extends z.ZodType>(schema: S): RequestHandler<ParamsDictionary, unknown, z.output<S>> {
  return (req, _res, next) => {
    const body: unknown = req.body === undefined ? {} : req.body;
    const result = schema.safeParse(body);
    if (!result.success) throw validationError(result.error);
    req.body = result.data;
    next();
  };
}
