import type { NextFunction, Request, Response } from 'express';
import { z } from 'zod';
import { badRequest } from '../http-error.js';

interface Schemas {
  headers?: z.ZodType;
  body?: z.ZodType;
  params?: z.ZodType;
  query?: z.ZodType;
}

// zod's default sentence for a missing field or an unreadable number names JavaScript values
// ("expected string, received undefined"); say it in words instead.
function issueSentence(issue: z.core.$ZodIssue): string {
  if (issue.code === 'invalid_type' && / received undefined$/.test(issue.message)) return 'is required';
  if (issue.code === 'invalid_type' && / received NaN$/.test(issue.message)) return `must be a ${issue.expected}`;
  return issue.message;
}

/** How a message names each part of a request. */
const partNames = { headers: 'The request headers are', params: 'The address is', query: 'The query string is', body: 'The request body is' } as const;

/** Validates headers, params, query and body with zod; the parsed values land in `res.locals.headers/params/query/body`. */
export function validate(schemas: Schemas) {
  return (req: Request, res: Response, next: NextFunction) => {
    for (const part of ['headers', 'params', 'query', 'body'] as const) {
      const schema = schemas[part];
      if (!schema) continue;
      const result = schema.safeParse(req[part] ?? {});
      if (!result.success) {
        const flat = z.flattenError(result.error);
        const first = result.error.issues[0];
        const where = first?.path.length ? `${first.path.join('.')}: ` : '';
        throw badRequest(`${partNames[part]} not valid: ${where}${first ? issueSentence(first) : 'invalid'}.`, {
          fieldErrors: flat.fieldErrors,
          formErrors: flat.formErrors,
        });
      }
      res.locals[part] = result.data;
    }
    next();
  };
}
