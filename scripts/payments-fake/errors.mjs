// Errors in the provider's shape: { error: { type, code, message, param, ... } } with its HTTP status.

export class ApiError extends Error {
  constructor(status, body) {
    super(body.message);
    this.status = status;
    this.body = body;
  }
}

/** 404 for an id the store does not hold. */
export const missing = (kind, id, param = 'id') =>
  new ApiError(404, {
    type: 'invalid_request_error',
    code: 'resource_missing',
    param,
    message: `No such ${kind}: '${id}'`,
  });

/** 400 for a bad or missing parameter. */
export const invalid = (message, param) =>
  new ApiError(400, { type: 'invalid_request_error', code: param ? 'parameter_invalid' : undefined, param, message });

/** 402 for a declined card. */
export const declined = (declineCode = 'generic_decline', message = 'Your card was declined.') =>
  new ApiError(402, { type: 'card_error', code: 'card_declined', decline_code: declineCode, message });
