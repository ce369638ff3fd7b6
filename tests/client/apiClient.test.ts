import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { api, ApiError, isApiError } from '../../src/lib/apiClient';
import { setCurrentTeamId } from '../../src/lib/currentTeam';

interface Recorded {
  url: string;
  init: RequestInit;
}

function answer(status: number, body?: unknown): Response {
  return new Response(body === undefined ? null : JSON.stringify(body), {
    status,
    headers: { 'Content-Type': 'application/json' },
  });
}

describe('apiClient', () => {
  let calls: Recorded[];

  beforeEach(() => {
    calls = [];
    setCurrentTeamId(null);
  });
  afterEach(() => vi.unstubAllGlobals());

  function stubFetch(response: () => Response | Promise<Response>) {
    vi.stubGlobal('fetch', async (url: string, init: RequestInit) => {
      calls.push({ url, init });
      return response();
    });
  }

  it('sends cookies, JSON and the current team header', async () => {
    stubFetch(() => answer(200, { id: 't1', name: 'Group', role: 'owner' }));
    setCurrentTeamId('team-42');
    const team = await api.patch<{ name: string }>('/api/team', { name: 'Group' });

    expect(team.name).toBe('Group');
    const { init } = calls[0]!;
    expect(init.credentials).toBe('include');
    expect(init.method).toBe('PATCH');
    expect(init.body).toBe('{"name":"Group"}');
    const headers = init.headers as Record<string, string>;
    expect(headers['Content-Type']).toBe('application/json');
    expect(headers['x-tacet-team']).toBe('team-42');
  });

  it('leaves the team header out when asked or when no team is chosen', async () => {
    stubFetch(() => answer(200, {}));
    await api.get('/api/me');
    setCurrentTeamId('team-42');
    await api.get('/api/invitations/abc', { withoutTeam: true });
    for (const { init } of calls) expect((init.headers as Record<string, string>)['x-tacet-team']).toBeUndefined();
  });

  it('turns the shared error shape into an ApiError with field issues', async () => {
    stubFetch(() =>
      answer(400, {
        error: {
          code: 'validation',
          message: 'Some fields need attention.',
          issues: [
            { path: 'email', message: 'Enter a valid e-mail address.' },
            { path: 'email', message: 'A second problem that is not shown.' },
            { path: 'role', message: 'Pick a role.' },
          ],
        },
      }),
    );
    const error = await api.post('/api/team/invitations', { email: 'x' }).catch((e: unknown) => e);
    expect(isApiError(error, 400)).toBe(true);
    const apiError = error as ApiError;
    expect(apiError.code).toBe('validation');
    expect(apiError.message).toBe('Some fields need attention.');
    expect(apiError.fieldErrors()).toEqual({ email: 'Enter a valid e-mail address.', role: 'Pick a role.' });
  });

  it('gives a readable error for answers that are not in the shared shape', async () => {
    stubFetch(() => new Response('<html>bad gateway</html>', { status: 502, statusText: 'Bad Gateway' }));
    const error = (await api.get('/api/team').catch((e: unknown) => e)) as ApiError;
    expect(error).toBeInstanceOf(ApiError);
    expect(error.status).toBe(502);
    expect(error.message).toContain('502');
  });

  it('reports an unreachable server as a network error', async () => {
    stubFetch(() => Promise.reject(new TypeError('fetch failed')));
    const error = (await api.get('/api/me').catch((e: unknown) => e)) as ApiError;
    expect(error.status).toBe(0);
    expect(error.code).toBe('network');
  });

  it('returns undefined for 204 answers', async () => {
    stubFetch(() => new Response(null, { status: 204 }));
    await expect(api.delete('/api/team/members/u1')).resolves.toBeUndefined();
  });

  it('uploads a form as it is, with the team header, and reads errors in the shared shape', async () => {
    stubFetch(() => answer(201, { id: 'cs1' }));
    setCurrentTeamId('team-42');
    const form = new FormData();
    form.append('name', 'sprinkled');
    await expect(api.upload<{ id: string }>('/api/causal-sets', form)).resolves.toEqual({ id: 'cs1' });
    const { init } = calls[0]!;
    expect(init.method).toBe('POST');
    expect(init.body).toBe(form);
    const headers = init.headers as Record<string, string>;
    // The browser writes the multipart content type with its boundary.
    expect(headers['Content-Type']).toBeUndefined();
    expect(headers['x-tacet-team']).toBe('team-42');

    stubFetch(() => answer(422, { error: { code: 'invalid_file', message: 'Row 3 is not a number.', issues: [{ path: 'file', message: 'row 3' }] } }));
    const error = (await api.upload('/api/causal-sets', form).catch((e: unknown) => e)) as ApiError;
    expect(error.status).toBe(422);
    expect(error.fieldErrors()).toEqual({ file: 'row 3' });
  });

  it('names what went wrong when a download is refused', async () => {
    stubFetch(() => answer(404, { error: { code: 'not_found', message: 'No such run.' } }));
    setCurrentTeamId('team-42');
    const refused = (await api.download('/api/runs/r1/points.csv', 'points.csv').catch((e: unknown) => e)) as ApiError;
    expect(refused.code).toBe('download_failed');
    expect(refused.message).toBe('No such run.');
    const headers = calls[0]!.init.headers as Record<string, string>;
    expect(headers['x-tacet-team']).toBe('team-42');
    expect(headers.Accept).toBeUndefined();

    stubFetch(() => new Response('<html>bad gateway</html>', { status: 502, statusText: 'Bad Gateway' }));
    const failed = (await api.download('/api/runs/r1/points.csv', 'points.csv').catch((e: unknown) => e)) as ApiError;
    expect(failed.message).toBe('The download failed (502 Bad Gateway).');
  });
});

describe('apiClient CSRF header', () => {
  afterEach(() => vi.unstubAllGlobals());

  it('echoes the tacet_csrf cookie on writes and not on reads', async () => {
    const calls: RequestInit[] = [];
    vi.stubGlobal('document', { cookie: 'other=1; tacet_csrf=abc%2D123; tacet_session=zzz' });
    vi.stubGlobal('fetch', async (_url: string, init: RequestInit) => {
      calls.push(init);
      return new Response(JSON.stringify({ ok: true }), { status: 200, headers: { 'Content-Type': 'application/json' } });
    });
    await api.get('/api/me');
    await api.patch('/api/me', { name: 'x' });
    await api.delete('/api/me/tokens/1');
    const header = (init: RequestInit) => (init.headers as Record<string, string>)['x-tacet-csrf'];
    expect(header(calls[0]!)).toBeUndefined();
    expect(header(calls[1]!)).toBe('abc-123');
    expect(header(calls[2]!)).toBe('abc-123');
  });
});
