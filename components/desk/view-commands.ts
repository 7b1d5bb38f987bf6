import type { ViewerApi } from '@/components/viewer';
import type { DeskCommand } from '@/lib/desk/keys';
import { nextPlane, nextSign, stepOpacity, type DeskPrefs } from '@/lib/desk/prefs';

/**
 * The desk's keys that change only what is shown (the same on the desk and the read-only run
 * view): moving between components, the map's threshold, layout, plane, zoom, pan, overlay, underlay.
 * Returns false for commands that are not about viewing (labels, notes, submit…).
 */
export function applyViewCommand(
  cmd: DeskCommand,
  ctx: {
    setPrefs: React.Dispatch<React.SetStateAction<DeskPrefs>>;
    viewer: ViewerApi | null;
    /** List positions reachable now (the strip's filter), in order. */
    order: number[];
    index: number;
    goTo: (i: number) => void;
    openGoTo: () => void;
    /** The run has a structural underlay (else the underlay key does nothing). */
    hasStructural?: boolean;
  },
): boolean {
  const { setPrefs, viewer, order, index, goTo } = ctx;
  const at = order.indexOf(index);
  switch (cmd.type) {
    case 'next':
      if (at >= 0 && at < order.length - 1) goTo(order[at + 1]);
      return true;
    case 'previous':
      if (at > 0) goTo(order[at - 1]);
      return true;
    case 'first':
      if (order.length) goTo(order[0]);
      return true;
    case 'last':
      if (order.length) goTo(order[order.length - 1]);
      return true;
    case 'goTo':
      ctx.openGoTo();
      return true;
    case 'thresholdDown':
      setPrefs((p) => ({ ...p, threshold: Math.max(1, Math.round((p.threshold - 0.5) * 10) / 10) }));
      return true;
    case 'thresholdUp':
      setPrefs((p) => ({ ...p, threshold: Math.min(12, Math.round((p.threshold + 0.5) * 10) / 10) }));
      return true;
    case 'layout':
      setPrefs((p) => ({ ...p, layout: p.layout === 'mosaic' ? 'multiplanar' : 'mosaic' }));
      return true;
    case 'plane':
      setPrefs((p) => ({ ...p, layout: 'multiplanar', plane: nextPlane(p.plane) }));
      return true;
    case 'overlay':
      setPrefs((p) => ({ ...p, overlay: { ...p.overlay, visible: !p.overlay.visible } }));
      return true;
    case 'underlay':
      if (ctx.hasStructural) setPrefs((p) => ({ ...p, underlay: p.underlay === 'structural' ? 'mean' : 'structural' }));
      return true;
    case 'sign':
      setPrefs((p) => ({ ...p, overlay: { ...p.overlay, sign: nextSign(p.overlay.sign) } }));
      return true;
    case 'opacityDown':
    case 'opacityUp':
      setPrefs((p) => ({
        ...p,
        overlay: { ...p.overlay, visible: true, opacity: stepOpacity(p.overlay.opacity, cmd.type === 'opacityUp' ? 1 : -1) },
      }));
      return true;
    case 'nextCluster':
      viewer?.nextCluster();
      return true;
    case 'slice':
      viewer?.moveSlice(cmd.delta);
      return true;
    case 'zoomIn':
      viewer?.zoom(1.25);
      return true;
    case 'zoomOut':
      viewer?.zoom(0.8);
      return true;
    case 'resetView':
      viewer?.resetView();
      return true;
    case 'pan':
      viewer?.pan(cmd.dx, cmd.dy);
      return true;
    default:
      return false;
  }
}
