export interface FieldError {
  pointer: string;
  message: string;
}

export interface ProblemBody {
  status?: number;
  title?: string;
  detail?: string;
  type?: string;
  errors?: FieldError[];
}

/** An RFC 9457 problem returned by the API, kept whole so screens can show its detail and field errors. */
export class ApiProblem extends Error {
  readonly status: number;
  readonly title: string;
  readonly detail: string;
  readonly type: string;
  readonly errors: FieldError[];

  constructor(body: ProblemBody, status: number) {
    super(body.detail ?? body.title ?? `Request failed (${status})`);
    this.status = body.status ?? status;
    this.title = body.title ?? 'Request failed';
    this.detail = body.detail ?? '';
    this.type = body.type ?? 'about:blank';
    this.errors = Array.isArray(body.errors) ? body.errors : [];
  }
}

export function isProblem(err: unknown): err is ApiProblem {
  return err instanceof ApiProblem;
}
