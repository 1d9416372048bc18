import { afterEach, describe, expect, it, vi } from 'vitest';
import type { HttpResponse } from 'tus-js-client';
import { keptClip, metadataOf } from '../../src/api/clip-uploads';
import { ApiRequestError } from '../../src/api/errors';

function response(status: number, body: string, headers: Record<string, string> = {}): HttpResponse {
  return {
    getStatus: () => status,
    getBody: () => body,
    getHeader: (name: string) => headers[name.toLowerCase()],
    getUnderlyingObject: () => null,
  };
}

afterEach(() => {
  vi.unstubAllGlobals();
});

describe('metadataOf', () => {
  it('carries the file name and the fields of the upload form when they are given', () => {
    const file = new File(['x'], 'punt 3.mp4', { type: 'video/mp4' });
    expect(metadataOf(file, { source: { kind: 'video', file }, slowMotion: true, captureFps: 240, label: '  Isla, punt 3 ' })).toEqual({
      filename: 'punt 3.mp4',
      filetype: 'video/mp4',
      slowMotion: 'true',
      captureFps: '240',
      label: 'Isla, punt 3',
    });
  });

  it('leaves out an empty label and a missing rate when they are not given', () => {
    const file = new File(['x'], 'kick.mov');
    expect(metadataOf(file, { source: { kind: 'video', file }, slowMotion: false, captureFps: null, label: ' ' })).toEqual({
      filename: 'kick.mov',
      filetype: 'application/octet-stream',
      slowMotion: 'false',
    });
  });
});

describe('keptClip', () => {
  it('reads the clip and job from the answer to the last part when it arrived', async () => {
    const data = { clip: { id: 7 }, job: { id: 9 } };
    await expect(keptClip(1, response(201, JSON.stringify({ data })))).resolves.toEqual(data);
  });

  it('fetches the clip and job named by the check when the answer to the last part was lost', async () => {
    const fetched: string[] = [];
    vi.stubGlobal('fetch', async (url: string) => {
      fetched.push(url);
      const body = url.endsWith('/clips/7') ? { data: { id: 7, label: 'kept' } } : { data: { id: 9, status: 'queued' } };
      return new Response(JSON.stringify(body), { status: 200, headers: { 'Content-Type': 'application/json' } });
    });
    const result = await keptClip(3, response(200, '', { 'arcwright-clip-id': '7', 'arcwright-job-id': '9' }));
    expect(result).toEqual({ clip: { id: 7, label: 'kept' }, job: { id: 9, status: 'queued' } });
    expect(fetched.sort()).toEqual(['/api/v1/clubs/3/clips/7', '/api/v1/clubs/3/jobs/9']);
  });

  it('fails with an API error when a complete upload names no clip', async () => {
    await expect(keptClip(3, response(200, ''))).rejects.toBeInstanceOf(ApiRequestError);
  });
});
