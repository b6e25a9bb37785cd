// The provider's error shape: `{ error: { type, code, message, param, decline_code } }` with the HTTP
// status its SDK maps to an error class (400/404 invalid request, 401 authentication, 402 card).

export type ErrorType = 'invalid_request_error' | 'card_error' | 'idempotency_error' | 'api_error';

export class ProviderError extends Error {
  constructor(
    readonly status: number,
    readonly type: ErrorType,
    message: string,
    readonly extra: { code?: string; param?: string; decline_code?: string } = {},
  ) {
    super(message);
  }

  toJSON() {
    return { error: { type: this.type, message: this.message, ...this.extra } };
  }
}

export const missing = (kind: string, id: string, param = 'id') =>
  new ProviderError(404, 'invalid_request_error', `No such ${kind}: '${id}'`, { code: 'resource_missing', param });

export const invalid = (param: string, message: string) => new ProviderError(400, 'invalid_request_error', message, { code: 'parameter_invalid', param });

export const cardDeclined = (code: string, declineCode: string | null, message: string) =>
  new ProviderError(402, 'card_error', message, { code, ...(declineCode ? { decline_code: declineCode } : {}) });
