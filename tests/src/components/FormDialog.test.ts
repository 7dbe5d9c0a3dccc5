import { describe, expect, it } from 'vitest';
import { mount } from '@vue/test-utils';
import { h } from 'vue';
import FormDialog from '../../../src/components/FormDialog.vue';
import { settle } from '../helpers/fake-server';

function mountDialog(message: string | null) {
  return mount(FormDialog, {
    attachTo: document.body,
    props: { modelValue: true, title: 'Register a rig', width: '460px', message, busy: false, submitLabel: 'Register', submitTest: 'register' },
    slots: { default: () => h('input', { name: 'name' }), lead: () => h('p', { class: 'lead' }, 'Before the form') },
  });
}

describe('FormDialog', () => {
  it('shows the lead, the form-wide message and the fields, in that order', async () => {
    const wrapper = mountDialog('Some fields need attention.');
    await settle(0);
    const dialog = document.body.querySelector('.el-dialog')!;
    const order = [...dialog.querySelectorAll('.lead, .el-alert, input[name="name"], [data-test="register"]')].map((el) => el.className || el.tagName);
    // common practice: the message sits between the dialog's lead text and the fields, the buttons last.
    expect(order.length).toBe(4);
    expect(order[0]).toBe('lead');
    expect(order[1]).toContain('el-alert');
    expect(order[2]).toBe('INPUT');
    expect(dialog.querySelector('.el-alert')!.textContent).toContain('Some fields need attention.');
    wrapper.unmount();
  });

  it('emits submit when the form is submitted and closes on Cancel', async () => {
    const wrapper = mountDialog(null);
    await settle(0);
    const dialog = document.body.querySelector('.el-dialog')!;
    expect(dialog.querySelector('.el-alert')).toBeNull();
    dialog.querySelector('form')!.dispatchEvent(new Event('submit', { bubbles: true, cancelable: true }));
    // common practice: pressing Enter or the submit button submits the form once.
    expect(wrapper.emitted('submit')).toHaveLength(1);
    const cancel = [...dialog.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Cancel')!;
    cancel.click();
    expect(wrapper.emitted('update:modelValue')?.[0]).toEqual([false]);
    wrapper.unmount();
  });
});
