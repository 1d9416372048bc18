import { computed, ref, watch } from 'vue';
import { useToast } from 'primevue/usetoast';
import { pixelToMetres } from '@shared/calibration/geometry';
import { useSessionsStore } from '@/stores/sessions';
import type { useTraceStore } from '@/stores/trace';
import { formatQuantity } from '@/utils/units';
import type { CalibrationOverlay, CanvasMode } from './canvas-types';
import type { Vec2 } from './viewport';

export type TracePanel = 'track' | 'calibrate';

export const TRACE_PANEL_OPTIONS = [
  { label: 'Mark the ball', value: 'track' as TracePanel, icon: 'pi pi-circle' },
  { label: 'Calibrate', value: 'calibrate' as TracePanel, icon: 'pi pi-arrows-h' },
];

/** Frames around the one in view that the viewer loads ahead (1–3 after, 1 before). */
const PREFETCH_OFFSETS = [1, 2, 3, -1];

/**
 * What the Trace screen's frame viewer shows and what its gestures do: the frame image and the ones to load
 * ahead, the mode (marking the ball, drawing the calibration, or looking), the calibration overlay, the
 * pointer's readout in pixels and metres, and a click that marks the ball (stepping on when asked).
 */
export function useTraceCanvas(trace: ReturnType<typeof useTraceStore>) {
  const toast = useToast();
  const sessions = useSessionsStore();
  const panel = ref<TracePanel>('track');
  /** "Step on after each mark". */
  const stepOn = ref(false);

  const src = computed(() => trace.frameSrc(trace.frame));
  const prefetch = computed(() => {
    const list: string[] = [];
    for (const d of PREFETCH_OFFSETS) {
      const n = trace.frame + d;
      if (n >= 0 && n < trace.frameCount) {
        const url = trace.frameSrc(n);
        if (url) list.push(url);
      }
    }
    return list;
  });

  const canvasMode = computed<CanvasMode>(() => {
    if (trace.readOnly) return 'view';
    if (panel.value === 'track') return trace.flight ? 'mark' : 'view';
    return trace.mode === 'mark' ? 'view' : trace.mode;
  });

  const overlay = computed<CalibrationOverlay | null>(() => {
    if (panel.value !== 'calibrate') return null;
    const d = trace.draft;
    if (d.method === 'plane') return { plane: d.corners, origin: d.origin, direction: d.direction };
    return { scale: d.scale, level: d.level, origin: d.origin, direction: d.direction };
  });

  watch(panel, (p) => {
    if (p === 'track') trace.mode = 'mark';
    else if (trace.draft.method === 'plane') trace.mode = trace.draft.corners.length < 4 ? 'plane' : 'view';
    else trace.mode = trace.draft.scale ? 'view' : 'scale';
  });

  // The fourth corner closes the outline; the origin is the next thing the calibration needs.
  watch(
    () => trace.draft.corners.length,
    (n, before) => {
      if (n === 4 && before === 3 && trace.mode === 'plane' && !trace.draft.origin) trace.mode = 'origin';
    },
  );

  function onPlace(p: { x: number; y: number; radius: number | null }): void {
    const problem = trace.placeProblem();
    if (problem) {
      toast.add({ severity: 'warn', summary: 'Not marked', detail: problem, life: 5000 });
      return;
    }
    trace.place(p);
    if (stepOn.value && trace.flight && trace.frame < trace.flight.frameEnd) trace.step(1);
  }

  function onLine(line: { a: Vec2; b: Vec2 }): void {
    if (trace.mode === 'scale' || trace.mode === 'level') {
      trace.setLine(trace.mode, line);
      // The scale is drawn first; the origin is the next thing the calibration needs.
      if (trace.mode === 'scale' && !trace.draft.origin) trace.mode = 'origin';
    }
  }

  function onPoint(p: Vec2): void {
    trace.setOrigin(p);
  }

  const hoverText = computed(() => {
    const h = trace.hover;
    if (!h) return '';
    const px = `x ${h.x.toFixed(1)}, y ${h.y.toFixed(1)} px`;
    const frame = panel.value === 'calibrate' ? (trace.draftFrame ?? trace.savedFrame) : trace.savedFrame;
    if (!frame) return px;
    const m = pixelToMetres(frame, { xPx: h.x, yPx: h.y });
    return `${px} · ${formatQuantity(m.xM, 'length', sessions.units)} along, ${formatQuantity(m.yM, 'length', sessions.units)} up`;
  });

  return { panel, stepOn, src, prefetch, canvasMode, overlay, onPlace, onLine, onPoint, hoverText };
}
