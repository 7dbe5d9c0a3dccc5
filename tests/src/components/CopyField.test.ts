import { afterEach, describe, expect, it, vi } from 'vitest';
import { mount } from '@vue/test-utils';
import CopyField from '../../../src/components/CopyField.vue';
import { settle } from '../helpers/fake-server';

function stubClipboard(writeText: (text: string) => Promise<void>) {
  const spy = vi.fn(writeText);
  vi.stubGlobal('navigator', { ...navigator, clipboard: { writeText: spy } });
  return spy;
}

describe('CopyField', () => {
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('copies the value it shows and says so until reset', async () => {
    const spy = stubClipboard(async () => {});
    const wrapper = mount(CopyField, { props: { value: 'rk_2f9c', what: 'key', valueTest: 'rig-key' } });
    expect(wrapper.get('[data-test="rig-key"]').text()).toBe('rk_2f9c');
    await wrapper.get('button').trigger('click');
    await settle(0);
    // common practice: what lands on the clipboard is exactly the value on screen.
    expect(spy).toHaveBeenCalledWith('rk_2f9c');
    expect(wrapper.get('button').text()).toBe('Copied');
    (wrapper.vm as unknown as { reset(): void }).reset();
    await wrapper.vm.$nextTick();
    expect(wrapper.get('button').text()).toBe('Copy');
    wrapper.unmount();
  });

  it('asks to copy by hand when the browser refuses clipboard access', async () => {
    stubClipboard(async () => {
      throw new DOMException('Write permission denied.', 'NotAllowedError');
    });
    const wrapper = mount(CopyField, { props: { value: 'https://lab.example/display/x', what: 'address', valueTest: 'display-url' } });
    expect(wrapper.find('.ac-hint').exists()).toBe(false);
    await wrapper.get('button').trigger('click');
    await settle(0);
    // Clipboard API: writeText rejects with NotAllowedError outside a secure context or without permission (common practice).
    expect(wrapper.get('.ac-hint').text()).toContain('select the address and copy it by hand');
    expect(wrapper.get('button').text()).toBe('Copy');
    wrapper.unmount();
  });
});
