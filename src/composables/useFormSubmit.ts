import { reactive, ref, watch, type Ref } from 'vue';
import type { ApiError } from '../api/http';
import { useServerErrors } from './useServerErrors';

/**
 * A form's submission: what the server said about it (`errors`, see useServerErrors) and a busy
 * flag while the request runs. `run(action)` sets busy, awaits the action and, when it throws,
 * records the failure in `errors` and returns it (null when the action succeeded).
 */
export function useFormSubmit() {
  const errors = reactive(useServerErrors());
  const busy = ref(false);

  async function run(action: () => Promise<void>): Promise<ApiError | null> {
    busy.value = true;
    try {
      await action();
      return null;
    } catch (e) {
      return errors.capture(e);
    } finally {
      busy.value = false;
    }
  }

  return { errors, busy, run };
}

/**
 * A form in a dialog bound to `open`: each time the dialog opens (and at once when `immediate` and
 * already open) the server's messages are cleared and the form is refilled from `blank()`;
 * `runAndClose(action)` closes the dialog once the action succeeds and leaves it open with the
 * failure shown otherwise. Other work on opening goes in the dialog's own watch of `open`, made
 * after this call: watchers of one source run in the order they were made.
 */
export function useDialogForm<T extends object>(open: Ref<boolean>, blank: () => T, options: { immediate?: boolean } = {}) {
  const form = reactive(blank()) as T;
  const { errors, busy, run } = useFormSubmit();

  watch(open, (isOpen) => {
    if (!isOpen) return;
    errors.clear();
    Object.assign(form, blank());
  }, { immediate: options.immediate ?? false });

  async function runAndClose(action: () => Promise<void>): Promise<void> {
    if (!(await run(action))) open.value = false;
  }

  return { form, errors, busy, runAndClose };
}
