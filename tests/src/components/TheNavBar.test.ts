import { beforeEach, describe, expect, it } from 'vitest';
import { mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import TheNavBar from '../../../src/components/TheNavBar.vue';
import { memoryRouter, signInAs } from '../helpers/signed-in';

async function navLabels(): Promise<string[]> {
  const router = memoryRouter();
  await router.push('/about');
  const wrapper = mount(TheNavBar, { global: { plugins: [router] } });
  const labels = wrapper.findAll('nav a').map((a) => a.text());
  wrapper.unmount();
  return labels;
}

describe('TheNavBar', () => {
  beforeEach(() => {
    setActivePinia(createPinia());
  });

  it('hides admin and rig items from a reviewer', async () => {
    signInAs('reviewer');
    const labels = await navLabels();
    // Permissions per role: shared/api/roles.ts PERMISSIONS (reviewer holds study:read and session:read, no rig:read).
    expect(labels).toEqual(['Studies', 'Sessions', 'About']);
  });

  it('shows rigs but no admin items to an experimenter', async () => {
    signInAs('experimenter');
    // shared/api/roles.ts: experimenter holds rig:read, not user:manage / audit:read / outbox:read.
    expect(await navLabels()).toEqual(['Studies', 'Sessions', 'Rigs', 'About']);
  });

  it('shows every item to an admin', async () => {
    signInAs('admin');
    // shared/api/roles.ts: admin holds every permission.
    expect(await navLabels()).toEqual(['Studies', 'Sessions', 'Rigs', 'About', 'Users', 'Audit log', 'Outbox']);
  });

  it('names the signed-in user and their role', async () => {
    signInAs('investigator');
    const router = memoryRouter();
    await router.push('/about');
    const wrapper = mount(TheNavBar, { global: { plugins: [router] } });
    // Display name as the auth store holds it (set by signInAs); the role by its label in src/components/role-info.ts.
    expect(wrapper.text()).toContain('Test investigator');
    expect(wrapper.get('[data-test="role"]').text()).toBe('Investigator');
    wrapper.unmount();
  });
});
