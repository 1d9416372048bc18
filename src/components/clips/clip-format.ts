import type { Clip, ClipStatus } from '@shared/schemas/clip';
import type { FlightStatus } from '@shared/schemas/flight';
import { FLIGHT_STATUS_LABELS } from '@shared/schemas/flight';

export type TagSeverity = 'success' | 'info' | 'warn' | 'danger' | 'secondary' | 'contrast';

/** Words and tag colours of a clip's processing state. Amber and red stay for cautions and failures. */
export const CLIP_STATUS_VIEW: Record<ClipStatus, { label: string; severity: TagSeverity; icon: string }> = {
  processing: { label: 'processing', severity: 'info', icon: 'pi pi-spin pi-cog' },
  ready: { label: 'ready to trace', severity: 'success', icon: 'pi pi-check' },
  failed: { label: 'failed', severity: 'danger', icon: 'pi pi-times' },
};

/** PRODUCT.md's flight status words, with tag colours. */
export const FLIGHT_STATUS_VIEW: Record<FlightStatus, { label: string; severity: TagSeverity }> = {
  uploaded: { label: FLIGHT_STATUS_LABELS.uploaded, severity: 'secondary' },
  traced: { label: FLIGHT_STATUS_LABELS.traced, severity: 'info' },
  fitted: { label: FLIGHT_STATUS_LABELS.fitted, severity: 'success' },
  reviewed: { label: FLIGHT_STATUS_LABELS.reviewed, severity: 'contrast' },
  needs_attention: { label: FLIGHT_STATUS_LABELS.needs_attention, severity: 'warn' },
};

/** Bytes in binary units, e.g. "48.2 MB" (MiB written MB, as file managers do). */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) return '—';
  if (bytes < 1024) return `${bytes} B`;
  const units = ['kB', 'MB', 'GB', 'TB'];
  let v = bytes / 1024;
  let i = 0;
  while (v >= 1024 && i < units.length - 1) {
    v /= 1024;
    i += 1;
  }
  return `${v.toFixed(v < 10 ? 1 : 0)} ${units[i]}`;
}

/** A frame rate without needless decimals: 29.97, 30, 239.76. */
export function formatFps(fps: number | null): string {
  if (fps === null || !Number.isFinite(fps)) return '—';
  return `${Number(fps.toFixed(2))} fps`;
}

export function formatSeconds(s: number | null): string {
  if (s === null || !Number.isFinite(s)) return '—';
  return `${s.toFixed(s < 10 ? 2 : 1)} s`;
}

/** One line of facts about a clip for lists. */
export function clipFacts(clip: Clip): string {
  const parts: string[] = [];
  if (clip.width && clip.height) parts.push(`${clip.width}×${clip.height}`);
  if (clip.slowMotion && clip.playbackFps) parts.push(`recorded at ${formatFps(clip.captureFps)}, plays at ${formatFps(clip.playbackFps)}`);
  else parts.push(`${formatFps(clip.captureFps)}${clip.kind === 'frames' ? ' (stated)' : ''}`);
  if (clip.frameCount !== null) parts.push(`${clip.frameCount} frames`);
  if (clip.durationS !== null) parts.push(formatSeconds(clip.durationS));
  parts.push(formatBytes(clip.sizeBytes));
  return parts.join(' · ');
}
