import { onBeforeUnmount, onMounted, shallowRef, watch, type Ref } from 'vue';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { canvas2dSupported } from './canvas';

/**
 * One uPlot chart in `target`, sized to its width (follows resizes), fed from `data`. The chart
 * is rebuilt only when `rebuild()` is called (options changed); data changes call setData.
 * Without a 2-D canvas (component tests) no chart is made and nothing throws.
 */
export function useUplot(
  target: Ref<HTMLElement | null>,
  options: (width: number) => uPlot.Options,
  data: () => uPlot.AlignedData,
) {
  const plot = shallowRef<uPlot | null>(null);
  let observer: ResizeObserver | null = null;

  function create(): void {
    const el = target.value;
    if (!el || !canvas2dSupported()) return;
    plot.value?.destroy();
    plot.value = new uPlot(options(Math.max(120, el.clientWidth)), data(), el);
  }

  onMounted(() => {
    create();
    const el = target.value;
    if (!el || typeof ResizeObserver === 'undefined') return;
    observer = new ResizeObserver(() => {
      const p = plot.value;
      const width = Math.max(120, el.clientWidth);
      if (p && Math.abs(p.width - width) > 1) p.setSize({ width, height: p.height });
    });
    observer.observe(el);
  });

  watch(data, (d) => plot.value?.setData(d));

  onBeforeUnmount(() => {
    observer?.disconnect();
    plot.value?.destroy();
    plot.value = null;
  });

  return { plot, rebuild: create };
}
