import { onBeforeUnmount, onMounted, type Ref } from 'vue';
import type { useTraceStore } from '@/stores/trace';
import { commandForKey, isTypingTarget, type TraceCommand } from './shortcuts';
import { nextDoubtfulFrame, nextPointFrame, pointAt } from './track-edit';
import type { Vec2 } from './viewport';

/** What the Trace screen's frame viewer lets the keys do. */
export interface TraceCanvasHandle {
  zoomIn(): void;
  zoomOut(): void;
  zoomFit(): void;
  zoomActual(): void;
  ensureVisible(p: Vec2): void;
  cancelLine(): boolean;
  toggleKeyCursor(): void;
}

export interface TraceKeyTargets {
  canvas: Ref<TraceCanvasHandle | null>;
  frameBar: Ref<{ focusJump(): void } | null>;
  help: Ref<{ toggle(): void; hide(): void } | null>;
  /** The side panel in view: the Delete key removes a mark only while the track is. */
  panel: Ref<'track' | 'calibrate'>;
}

/**
 * The Trace screen's keyboard shortcuts (see shortcuts.ts for the keys): listened for on the window while the
 * screen is shown, ignored while the user types in a field or a dialog is open.
 */
export function useTraceKeys(trace: ReturnType<typeof useTraceStore>, targets: TraceKeyTargets) {
  const { canvas, frameBar, help, panel } = targets;

  /** Pans the viewer so the mark on the frame in view is not hidden at an edge. */
  function keepPointInView(): void {
    const p = pointAt(trace.points, trace.frame);
    if (p) canvas.value?.ensureVisible(p);
  }

  function goTo(n: number | undefined): void {
    if (n === undefined) return;
    trace.setFrame(n);
    keepPointInView();
  }

  /** Jumps to the next mark the follower was unsure of. */
  function nextDoubtful(): void {
    goTo(nextDoubtfulFrame(trace.points, trace.frame));
  }

  function run(cmd: TraceCommand): void {
    switch (cmd.kind) {
      case 'step':
        trace.step(cmd.delta);
        keepPointInView();
        break;
      case 'first':
        trace.setFrame(0);
        break;
      case 'last':
        trace.setFrame(trace.frameCount - 1);
        break;
      case 'prevPoint':
      case 'nextPoint':
        goTo(nextPointFrame(trace.points, trace.frame, cmd.kind === 'nextPoint' ? 1 : -1));
        break;
      case 'undo':
        if (!trace.readOnly) trace.undo();
        break;
      case 'redo':
        if (!trace.readOnly) trace.redo();
        break;
      case 'deletePoint':
        if (panel.value === 'track') trace.deleteAt();
        break;
      case 'zoomIn':
        canvas.value?.zoomIn();
        break;
      case 'zoomOut':
        canvas.value?.zoomOut();
        break;
      case 'zoomFit':
        canvas.value?.zoomFit();
        break;
      case 'zoomActual':
        canvas.value?.zoomActual();
        break;
      case 'jump':
        frameBar.value?.focusJump();
        break;
      case 'keyMark':
        if (!trace.readOnly && panel.value === 'track') canvas.value?.toggleKeyCursor();
        break;
      case 'help':
        help.value?.toggle();
        break;
      case 'cancel':
        if (!canvas.value?.cancelLine()) help.value?.hide();
        break;
    }
  }

  function onKeyDown(e: KeyboardEvent): void {
    if (e.defaultPrevented || isTypingTarget(e.target as HTMLElement | null)) return;
    // Dialogs own their keys.
    if (document.querySelector('.p-dialog-mask')) return;
    const cmd = commandForKey(e);
    if (!cmd) return;
    e.preventDefault();
    run(cmd);
  }

  onMounted(() => window.addEventListener('keydown', onKeyDown));
  onBeforeUnmount(() => window.removeEventListener('keydown', onKeyDown));

  return { run, nextDoubtful };
}
