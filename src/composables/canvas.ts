/** Canvas helpers shared by the charts. */

let supported: boolean | null = null;

/** True when this environment draws on a 2-D canvas (false in a DOM without one, e.g. component tests). */
export function canvas2dSupported(): boolean {
  if (supported === null) {
    try {
      supported = typeof document !== 'undefined' && document.createElement('canvas').getContext('2d') !== null;
    } catch {
      supported = false;
    }
  }
  return supported;
}

/** Size a canvas's backing store for crisp drawing on high-DPI screens; returns its 2-D context scaled to CSS pixels. */
export function prepareCanvas(canvas: HTMLCanvasElement, widthCss: number, heightCss: number): CanvasRenderingContext2D | null {
  if (!canvas2dSupported()) return null;
  const ratio = Math.max(1, window.devicePixelRatio || 1);
  const w = Math.max(1, Math.round(widthCss * ratio));
  const h = Math.max(1, Math.round(heightCss * ratio));
  if (canvas.width !== w) canvas.width = w;
  if (canvas.height !== h) canvas.height = h;
  const ctx = canvas.getContext('2d');
  ctx?.setTransform(ratio, 0, 0, ratio, 0, 0);
  return ctx;
}

/** Read a design token (a CSS custom property on :root), with a fallback when styles are absent. */
export function token(name: string, fallback: string): string {
  if (typeof getComputedStyle === 'undefined') return fallback;
  const v = getComputedStyle(document.documentElement).getPropertyValue(name).trim();
  return v || fallback;
}
