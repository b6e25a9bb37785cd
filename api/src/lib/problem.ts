/** An RFC 9457 problem detail. Throw it anywhere below a route; the error handler renders it. */
export interface ProblemFieldError {
  pointer: string;
  message: string;
}

export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance?: string;
  errors?: ProblemFieldError[];
  [extension: string]: unknown;
}

export const problemType = (slug: string) => `/problems/${slug}`;

export class HttpProblem extends Error {
  readonly status: number;
  readonly type: string;
  readonly title: string;
  readonly errors?: ProblemFieldError[];
  readonly extensions: Record<string, unknown>;
  readonly headers: Record<string, string>;

  constructor(opts: {
    status: number;
    slug: string;
    title: string;
    detail: string;
    errors?: ProblemFieldError[];
    extensions?: Record<string, unknown>;
    headers?: Record<string, string>;
  }) {
    super(opts.detail);
    this.status = opts.status;
    this.type = problemType(opts.slug);
    this.title = opts.title;
    this.errors = opts.errors;
    this.extensions = opts.extensions ?? {};
    this.headers = opts.headers ?? {};
  }

  toBody(instance?: string): ProblemBody {
    return {
      type: this.type,
      title: this.title,
      status: this.status,
      detail: this.message,
      ...(instance ? { instance } : {}),
      ...(this.errors ? { errors: this.errors } : {}),
      ...this.extensions,
    };
  }
}

export const validationProblem = (errors: ProblemFieldError[], detail?: string) =>
  new HttpProblem({
    status: 400,
    slug: 'validation-failed',
    title: 'The request is not valid',
    detail: detail ?? `${errors.length} field${errors.length === 1 ? '' : 's'} failed validation: ${errors.map((e) => e.pointer || '(body)').join(', ')}`,
    errors,
  });

export const notFound = (what: string) =>
  new HttpProblem({ status: 404, slug: 'not-found', title: 'Not found', detail: `${what} was not found.` });
