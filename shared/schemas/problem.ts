/**
 * One entry of an RFC 9457 problem's `errors[]` (422 answers): which field was refused and why.
 * The back end writes them (`backend/lib/http-problem.ts`), the front end places them beside a
 * form's fields.
 */
export interface ProblemFieldError {
  /** Dot-joined path of the offending field, e.g. `email` or `roles.0`. */
  path: string;
  message: string;
  /** For imports: the file's row (1-based) and column. */
  row?: number;
  column?: string;
}
