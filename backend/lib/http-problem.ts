import type { ProblemFieldError } from '../../shared/schemas/problem.ts';

export type { ProblemFieldError };

/** An error that the problem handler writes as RFC 9457 problem JSON. Services throw these. */
export class HttpProblem extends Error {
  constructor(
    public readonly status: number,
    public readonly title: string,
    public readonly detail?: string,
    public readonly errors?: ProblemFieldError[],
    public readonly type: string = 'about:blank',
    public readonly extra: Record<string, unknown> = {},
  ) {
    super(detail ?? title);
  }
}

export const badRequest = (detail: string, errors?: ProblemFieldError[]) => new HttpProblem(400, 'Bad request', detail, errors);
export const unauthorized = (detail = 'Sign in first.') => new HttpProblem(401, 'Not signed in', detail);
export const forbidden = (detail = 'You may not do this.') => new HttpProblem(403, 'Forbidden', detail);
export const notFound = (what: string) => new HttpProblem(404, 'Not found', `${what} not found.`);
export const conflict = (detail: string, extra: Record<string, unknown> = {}) => new HttpProblem(409, 'Conflict', detail, undefined, 'about:blank', extra);
export const gone = (detail: string) => new HttpProblem(410, 'Gone', detail);
export const unprocessable = (detail: string, errors?: ProblemFieldError[]) =>
  new HttpProblem(422, 'Validation failed', detail, errors ?? [{ path: '', message: detail }]);
