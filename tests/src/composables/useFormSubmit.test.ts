import { describe, expect, it } from 'vitest';
import { effectScope, nextTick, ref } from 'vue';
import { ApiError } from '../../../src/api/http';
import { useDialogForm, useFormSubmit } from '../../../src/composables/useFormSubmit';

describe('useFormSubmit', () => {
  it('is busy while the action runs and idle after it', async () => {
    const { busy, run } = useFormSubmit();
    let finish: () => void = () => {};
    const running = run(() => new Promise<void>((resolve) => { finish = resolve; }));
    // common practice: the submit button shows its loading state for the whole request.
    expect(busy.value).toBe(true);
    finish();
    // A successful action returns no failure.
    expect(await running).toBeNull();
    expect(busy.value).toBe(false);
  });

  it('puts a failure on the form and returns it', async () => {
    const { errors, busy, run } = useFormSubmit();
    const failure = await run(async () => {
      throw new ApiError('invalid-token', 'The link is no longer valid', 400, { token: 'Expired' });
    });
    // The error shape is the API contract of shared/api/errors.ts: code, message, fields.
    expect(failure?.code).toBe('invalid-token');
    expect(errors.message).toBe('The link is no longer valid');
    expect(errors.fieldError('token')).toBe('Expired');
    expect(busy.value).toBe(false);
  });
});

describe('useDialogForm', () => {
  function setUp() {
    const open = ref(false);
    const scope = effectScope();
    const dialog = scope.run(() => useDialogForm(open, () => ({ name: '', tags: [] as string[] })))!;
    return { open, scope, dialog };
  }

  it('refills the form and clears old messages each time the dialog opens', async () => {
    const { open, scope, dialog } = setUp();
    dialog.form.name = 'left over';
    dialog.form.tags.push('x');
    await dialog.runAndClose(async () => { throw new Error('refused'); });
    // common practice: a dialog opens on an empty form, without the last attempt's messages.
    expect(dialog.errors.message).toBe('refused');
    open.value = true;
    await nextTick();
    expect(dialog.form).toEqual({ name: '', tags: [] });
    expect(dialog.errors.message).toBeNull();
    scope.stop();
  });

  it('closes after a successful action and stays open after a failed one', async () => {
    const { open, scope, dialog } = setUp();
    open.value = true;
    await nextTick();
    await dialog.runAndClose(async () => { throw new ApiError('conflict', 'Name taken', 409, { name: 'Already used' }); });
    // common practice: a refused submission keeps the dialog and shows why on the field.
    expect(open.value).toBe(true);
    expect(dialog.errors.fieldError('name')).toBe('Already used');
    await dialog.runAndClose(async () => {});
    expect(open.value).toBe(false);
    scope.stop();
  });
});
