import { describe, expect, it } from 'vitest';
import { uploadForm } from '../../../src/api/clips';

describe('uploadForm', () => {
  it('sends the video, the slow-motion switch and the recording rate when a slow-motion clip is uploaded', () => {
    const video = new File([new Uint8Array([0, 0, 0, 24])], 'punt.mp4', { type: 'video/mp4' });
    const form = uploadForm({ source: { kind: 'video', file: video }, slowMotion: true, captureFps: 240, label: '  Isla, punt 3 ' });
    expect(form.get('slowMotion')).toBe('true');
    expect(form.get('captureFps')).toBe('240');
    expect(form.get('label')).toBe('Isla, punt 3');
    expect((form.get('video') as File).name).toBe('punt.mp4');
    expect(form.getAll('frames')).toEqual([]);
    // Text fields go first, so the server can check them before reading the file.
    expect([...form.keys()]).toEqual(['slowMotion', 'captureFps', 'label', 'video']);
  });

  it('sends every frame under "frames" and leaves the rate and label out when they are not given', () => {
    const frames = ['f1.png', 'f2.png', 'f10.png'].map((n) => new File([new Uint8Array([137, 80])], n, { type: 'image/png' }));
    const form = uploadForm({ source: { kind: 'frames', files: frames }, slowMotion: false, captureFps: null });
    expect((form.getAll('frames') as File[]).map((f) => f.name)).toEqual(['f1.png', 'f2.png', 'f10.png']);
    expect(form.get('slowMotion')).toBe('false');
    expect(form.has('captureFps')).toBe(false);
    expect(form.has('label')).toBe(false);
  });
});
