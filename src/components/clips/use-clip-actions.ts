import { useConfirm } from 'primevue/useconfirm';
import type { Clip } from '@shared/schemas/clip';
import { ApiRequestError } from '@/api/errors';
import { useClipsStore } from '@/stores/clips';

/** The confirmation before a clip is deleted: it says how many flights go with it. */
export function useClipDelete(afterDelete?: (clip: Clip) => void) {
  const confirm = useConfirm();
  const clips = useClipsStore();

  return function askRemove(clip: Clip): void {
    const n = clip.flightCount;
    confirm.require({
      header: `Delete the clip "${clip.label}"?`,
      message:
        n > 0
          ? `Its ${n} flight${n === 1 ? '' : 's'} go with it: tracks, fits and the frames. It cannot be undone.`
          : 'Its frames go with it. It cannot be undone.',
      icon: 'pi pi-exclamation-triangle',
      rejectProps: { label: 'Keep it', severity: 'secondary', text: true },
      acceptProps: { label: n > 0 ? `Delete with ${n} flight${n === 1 ? '' : 's'}` : 'Delete', severity: 'danger' },
      accept: async () => {
        try {
          await clips.remove(clip, n > 0);
          afterDelete?.(clip);
        } catch (error) {
          // A flight was added meanwhile: read the clip again so the next confirmation counts it.
          if (error instanceof ApiRequestError && error.code === 'CONFLICT') void clips.refresh(clip.id);
        }
      },
    });
  };
}
