import { computed, ref } from 'vue';
import { useConfirm } from 'primevue/useconfirm';
import { useToast } from 'primevue/usetoast';
import { ApiRequestError } from '@/api/errors';
import { trackCsvUrl } from '@/api/flights';
import { useClubStore } from '@/stores/club';
import type { useTraceStore } from '@/stores/trace';

/** The largest CSV the screen sends: the API reads JSON bodies up to 1 MB, and 10 000 points fit well within it. */
const CSV_MAX_BYTES = 1_000_000;

/**
 * CSV in and out on the Trace screen: the hidden file input behind "Import CSV" (asking before marks are
 * replaced, showing the server's message about the first bad cell) and the link of "Export CSV".
 */
export function useTraceCsv(trace: ReturnType<typeof useTraceStore>) {
  const confirm = useConfirm();
  const toast = useToast();
  const club = useClubStore();
  const csvInput = ref<HTMLInputElement | null>(null);
  const csvError = ref<string | null>(null);

  const csvHref = computed(() => (trace.flight && club.clubId !== null ? trackCsvUrl(club.clubId, trace.flight.id) : null));

  function pickCsv(): void {
    csvError.value = null;
    csvInput.value?.click();
  }

  async function onCsv(e: Event): Promise<void> {
    const input = e.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    csvError.value = null;
    if (file.size > CSV_MAX_BYTES) {
      csvError.value = `"${file.name}" is larger than 1 MB. A track holds at most 10 000 points: keep the frame, x_px and y_px columns (or t, x, y) and try again.`;
      return;
    }
    const go = async () => {
      try {
        await trace.importCsv(await file.text());
        toast.add({ severity: 'success', summary: 'Track imported', detail: `${trace.points.length} marks from ${file.name}.`, life: 4000 });
      } catch (error) {
        csvError.value = error instanceof ApiRequestError ? (error.fields.csv ?? error.message) : 'The file could not be read.';
      }
    };
    if (trace.points.length > 0) {
      confirm.require({
        header: 'Replace the track?',
        message: `The ${trace.points.length} marks of this flight are replaced by the file's points. Undo brings them back until you leave.`,
        rejectProps: { label: 'Keep the marks', severity: 'secondary', text: true },
        acceptProps: { label: 'Replace' },
        accept: go,
      });
    } else await go();
  }

  return { csvInput, csvError, csvHref, pickCsv, onCsv };
}
