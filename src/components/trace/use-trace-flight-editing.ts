import { onBeforeUnmount, onMounted, ref } from 'vue';
import { onBeforeRouteLeave, useRoute, useRouter } from 'vue-router';
import { useConfirm } from 'primevue/useconfirm';
import type { Flight, FlightInput } from '@/api/flights';
import type { useTraceStore } from '@/stores/trace';

/**
 * The flights of the clip on the Trace screen: switching between them, the add/edit dialog, deleting one, and
 * the guard that asks before unsaved marks are left behind (another flight, another page, closing the tab).
 * The flight in view is kept in the address (`?flight=`), so a reload opens it again.
 */
export function useTraceFlightEditing(trace: ReturnType<typeof useTraceStore>) {
  const route = useRoute();
  const router = useRouter();
  const confirm = useConfirm();
  const flightDialogOpen = ref(false);
  const editingFlight = ref<Flight | null>(null);

  /** Resolves true when there is nothing unsaved or the coach agrees to drop it. */
  function confirmDiscard(): Promise<boolean> {
    if (!trace.dirty) return Promise.resolve(true);
    return new Promise((resolve) => {
      confirm.require({
        header: 'Unsaved marks',
        message: 'This flight has marks that are not saved. Leave them?',
        icon: 'pi pi-exclamation-triangle',
        rejectProps: { label: 'Stay', severity: 'secondary', text: true },
        acceptProps: { label: 'Leave without saving', severity: 'danger' },
        accept: () => resolve(true),
        reject: () => resolve(false),
        onHide: () => resolve(false),
      });
    });
  }

  function showInAddress(flightId: number): void {
    void router.replace({ query: { ...route.query, flight: String(flightId) } });
  }

  async function selectFlight(id: number): Promise<void> {
    if (id === trace.flightId || !(await confirmDiscard())) return;
    await trace.selectFlight(id);
    showInAddress(id);
  }

  function addFlight(): void {
    editingFlight.value = null;
    flightDialogOpen.value = true;
  }

  function editFlight(f: Flight): void {
    editingFlight.value = f;
    flightDialogOpen.value = true;
  }

  /** The dialog's save: changes the flight being edited, or adds a new one and shows it. */
  async function saveFlight(input: FlightInput): Promise<void> {
    if (editingFlight.value) {
      await trace.changeFlight(editingFlight.value.id, input);
      return;
    }
    if (!(await confirmDiscard())) return;
    const created = await trace.addFlight(input);
    if (created) {
      showInAddress(created.id);
      if (trace.frame < created.frameStart || trace.frame > created.frameEnd) trace.setFrame(created.frameStart);
    }
  }

  function removeFlight(f: Flight): void {
    confirm.require({
      header: `Delete ${f.athleteName}'s flight?`,
      message: `Its ${f.pointCount} mark${f.pointCount === 1 ? '' : 's'} and fits go with it. The clip stays. It cannot be undone.`,
      icon: 'pi pi-exclamation-triangle',
      rejectProps: { label: 'Keep it', severity: 'secondary', text: true },
      acceptProps: { label: 'Delete flight', severity: 'danger' },
      accept: () => void trace.removeFlight(f.id),
    });
  }

  function onBeforeUnload(e: BeforeUnloadEvent): void {
    if (trace.dirty) e.preventDefault();
  }

  onBeforeRouteLeave(() => confirmDiscard());
  onMounted(() => window.addEventListener('beforeunload', onBeforeUnload));
  onBeforeUnmount(() => window.removeEventListener('beforeunload', onBeforeUnload));

  return { flightDialogOpen, editingFlight, selectFlight, addFlight, editFlight, saveFlight, removeFlight };
}
