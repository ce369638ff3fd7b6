// Names client and server agree on outside the JSON bodies. No zod here: the client's first load
// (the API client) reads them, and zod is kept out of it.

/** Cookie that carries the session JWT (httpOnly, SameSite=Lax). */
export const sessionCookieName = 'tacet_session';
/** Header that selects the team a request acts in; without it the user's first team is used. */
export const teamHeaderName = 'x-tacet-team';

/**
 * CSRF double-submit pair: the server sets this readable cookie; a cookie-authenticated write must
 * echo its value in the header. Requests with `Authorization: Bearer` need neither.
 */
export const csrfCookieName = 'tacet_csrf';
export const csrfHeaderName = 'x-tacet-csrf';
