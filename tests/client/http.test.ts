import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiRequestError, describeError, networkError, toApiRequestError } from '../../src/api/errors';
import { apiUrl, http, resetCsrfToken, setErrorReporter, setUnauthenticatedHandler } from '../../src/api/http';

function json(status: number, body: unknown): Response {
  return new Response(body === undefined ? null : JSON.stringify(body), {
    status,
    headers: { 'Content-Type': 'application/json' },
  });
}

describe('toApiRequestError', () => {
  it('keeps code, message and fields when the body is the API error shape', () => {
    const error = toApiRequestError(400, {
      error: { code: 'VALIDATION_FAILED', message: 'Check the highlighted fields.', fields: { email: 'Enter an e-mail address.' } },
    });
    expect(error).toBeInstanceOf(ApiRequestError);
    expect(error.code).toBe('VALIDATION_FAILED');
    expect(error.status).toBe(400);
    expect(error.message).toBe('Check the highlighted fields.');
    expect(error.fields).toEqual({ email: 'Enter an e-mail address.' });
  });

  it('derives the code from the status when the code is unknown', () => {
    const error = toApiRequestError(409, { error: { code: 'SOMETHING_NEW', message: 'Taken.' } });
    expect(error.code).toBe('CONFLICT');
    expect(error.message).toBe('Taken.');
  });

  it('gives a message a coach can act on when the body is not JSON', () => {
    const error = toApiRequestError(502, '<html>Bad gateway</html>');
    expect(error.code).toBe('SERVICE_UNAVAILABLE');
    expect(error.message).toMatch(/not reachable/i);
    expect(error.fields).toEqual({});
  });

  it('drops fields that are not a map of strings when the server sends another shape', () => {
    const error = toApiRequestError(400, { error: { code: 'VALIDATION_FAILED', message: 'Bad.', fields: ['email'] } });
    expect(error.fields).toEqual({});
  });

  it('fills in a message when the error message is empty', () => {
    const error = toApiRequestError(429, { error: { code: 'RATE_LIMITED', message: '' } });
    expect(error.message).toMatch(/too many attempts/i);
  });
});

describe('describeError', () => {
  it('announces a refused request as a caution and a server failure as an error', () => {
    expect(describeError(toApiRequestError(409, { error: { code: 'CONFLICT', message: 'The last admin cannot be demoted.' } }))).toEqual({
      severity: 'warn',
      summary: 'Not saved',
      detail: 'The last admin cannot be demoted.',
    });
    expect(describeError(toApiRequestError(500, { error: { code: 'INTERNAL', message: 'Something went wrong (reference abc).' } })).severity).toBe(
      'error',
    );
  });

  it('never shows the text of an unexpected exception when the error is not from the API', () => {
    const notice = describeError(new TypeError('Cannot read properties of undefined'));
    expect(notice.detail).not.toMatch(/undefined/);
    expect(notice.severity).toBe('error');
  });

  it('describes a request that got no answer as not reachable', () => {
    expect(networkError().status).toBe(0);
    expect(describeError(networkError()).summary).toBe('Not reachable');
  });
});

describe('http', () => {
  const fetchMock = vi.fn<typeof fetch>();
  const reported: unknown[] = [];
  let sessionEnded = 0;

  beforeEach(() => {
    fetchMock.mockReset();
    vi.stubGlobal('fetch', fetchMock);
    resetCsrfToken();
    reported.length = 0;
    sessionEnded = 0;
    setErrorReporter((error) => reported.push(error));
    setUnauthenticatedHandler(() => {
      sessionEnded += 1;
    });
  });

  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('builds API URLs with only the query values that are set', () => {
    expect(apiUrl('/clubs/3/sessions', { venue: 'North field', from: undefined, to: null, page: 2 })).toBe(
      '/api/v1/clubs/3/sessions?venue=North+field&page=2',
    );
    expect(apiUrl('auth/me')).toBe('/api/v1/auth/me');
  });

  it('sends the CSRF token fetched once when it makes changes', async () => {
    fetchMock
      .mockResolvedValueOnce(json(200, { data: { csrfToken: 'tok-1' } }))
      .mockResolvedValueOnce(json(200, { data: { id: 1 } }))
      .mockResolvedValueOnce(json(200, { data: { id: 2 } }));

    await http.patch('/clubs/1', { name: 'Fennick Vale Sporting Club' });
    await http.post('/clubs/1/athletes', { displayName: 'Wren Halloway' });

    expect(fetchMock).toHaveBeenCalledTimes(3);
    expect(fetchMock.mock.calls[0][0]).toBe('/api/v1/auth/csrf');
    const patchInit = fetchMock.mock.calls[1][1] as RequestInit;
    expect((patchInit.headers as Record<string, string>)['X-CSRF-Token']).toBe('tok-1');
    expect(patchInit.body).toBe(JSON.stringify({ name: 'Fennick Vale Sporting Club' }));
    expect(((fetchMock.mock.calls[2][1] as RequestInit).headers as Record<string, string>)['X-CSRF-Token']).toBe('tok-1');
  });

  it('sends no CSRF token when it only reads', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { data: [] }));
    await http.get('/clubs/1/members');
    expect(fetchMock).toHaveBeenCalledTimes(1);
    expect(((fetchMock.mock.calls[0][1] as RequestInit).headers as Record<string, string>)['X-CSRF-Token']).toBeUndefined();
  });

  it('fetches a fresh token and retries once when the server answers CSRF_INVALID', async () => {
    fetchMock
      .mockResolvedValueOnce(json(200, { data: { csrfToken: 'old' } }))
      .mockResolvedValueOnce(json(403, { error: { code: 'CSRF_INVALID', message: 'The form expired.' } }))
      .mockResolvedValueOnce(json(200, { data: { csrfToken: 'new' } }))
      .mockResolvedValueOnce(new Response(null, { status: 204 }));

    await expect(http.post('/auth/signout')).resolves.toBeUndefined();
    expect(((fetchMock.mock.calls[3][1] as RequestInit).headers as Record<string, string>)['X-CSRF-Token']).toBe('new');
    expect(reported).toHaveLength(0);
  });

  it('throws and reports once when the retry is refused too', async () => {
    fetchMock
      .mockResolvedValueOnce(json(200, { data: { csrfToken: 'a' } }))
      .mockResolvedValueOnce(json(403, { error: { code: 'CSRF_INVALID', message: 'The form expired.' } }))
      .mockResolvedValueOnce(json(200, { data: { csrfToken: 'b' } }))
      .mockResolvedValueOnce(json(403, { error: { code: 'CSRF_INVALID', message: 'The form expired.' } }));

    await expect(http.post('/clubs/1/athletes', {})).rejects.toMatchObject({ code: 'CSRF_INVALID', status: 403 });
    expect(fetchMock).toHaveBeenCalledTimes(4);
    expect(reported).toHaveLength(1);
  });

  it('reports a failed change but not a failed read when notify is left to its default', async () => {
    fetchMock
      .mockResolvedValueOnce(json(404, { error: { code: 'NOT_FOUND', message: 'No such club.' } }))
      .mockResolvedValueOnce(json(200, { data: { csrfToken: 't' } }))
      .mockResolvedValueOnce(json(409, { error: { code: 'CONFLICT', message: 'The last admin cannot be demoted.' } }));

    await expect(http.get('/clubs/9/overview')).rejects.toBeInstanceOf(ApiRequestError);
    expect(reported).toHaveLength(0);
    await expect(http.patch('/clubs/1/members/4', { role: 'coach' })).rejects.toMatchObject({ code: 'CONFLICT' });
    expect(reported).toHaveLength(1);
    expect((reported[0] as ApiRequestError).message).toBe('The last admin cannot be demoted.');
  });

  it('calls the session-ended handler instead of a toast when a request answers UNAUTHENTICATED', async () => {
    fetchMock.mockResolvedValueOnce(json(401, { error: { code: 'UNAUTHENTICATED', message: 'Sign in first.' } }));
    await expect(http.get('/clubs/1/overview', { notify: true })).rejects.toMatchObject({ code: 'UNAUTHENTICATED' });
    expect(sessionEnded).toBe(1);
    expect(reported).toHaveLength(0);
  });

  it('leaves a 401 to the caller when it expects one', async () => {
    fetchMock.mockResolvedValueOnce(json(401, { error: { code: 'UNAUTHENTICATED', message: 'Sign in first.' } }));
    await expect(http.get('/auth/me', { expectUnauthenticated: true })).rejects.toMatchObject({ status: 401 });
    expect(sessionEnded).toBe(0);
  });

  it('throws a SERVICE_UNAVAILABLE error with status 0 when the server cannot be reached', async () => {
    fetchMock.mockRejectedValueOnce(new TypeError('fetch failed'));
    await expect(http.get('/health')).rejects.toMatchObject({ code: 'SERVICE_UNAVAILABLE', status: 0 });
  });

  it('tries the CSRF token again on the next change when fetching it failed', async () => {
    fetchMock
      .mockRejectedValueOnce(new TypeError('fetch failed'))
      .mockResolvedValueOnce(json(200, { data: { csrfToken: 'second' } }))
      .mockResolvedValueOnce(json(201, { data: { id: 5 } }));

    await expect(http.post('/clubs/1/athletes', { displayName: 'A' })).rejects.toMatchObject({ status: 0 });
    await expect(http.post('/clubs/1/athletes', { displayName: 'A' })).resolves.toEqual({ data: { id: 5 } });
  });
});
