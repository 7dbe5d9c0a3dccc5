import { ref } from 'vue';

/**
 * Copy text to the clipboard and remember how it went: 'done', 'failed' (the browser refused
 * access, e.g. outside a secure context) or 'idle' before the first try and after `reset()`.
 */
export function useClipboardCopy() {
  const copied = ref<'idle' | 'done' | 'failed'>('idle');

  async function copy(text: string): Promise<void> {
    try {
      await navigator.clipboard.writeText(text);
      copied.value = 'done';
    } catch {
      copied.value = 'failed';
    }
  }

  function reset(): void {
    copied.value = 'idle';
  }

  return { copied, copy, reset };
}
