import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import StudyForm from '../../../src/components/StudyForm.vue';
import { resetCsrfToken } from '../../../src/api/http';
import { fakeServer, settle } from '../helpers/fake-server';

function itemOf(wrapper: VueWrapper, field: string) {
  return wrapper.get(`[data-field="${field}"]`);
}

/** Type each tag into an ElInputTag and press Enter, as a user does. */
async function addTags(wrapper: VueWrapper, field: string, tags: string[]): Promise<void> {
  const input = itemOf(wrapper, field).get('input');
  for (const tag of tags) {
    await input.setValue(tag);
    await input.trigger('keydown', { key: 'Enter', code: 'Enter' });
  }
}

async function fillValidStudy(wrapper: VueWrapper): Promise<void> {
  await wrapper.get('input[name="name"]').setValue('Left vs right imagery');
  await wrapper.get('input[name="ethicsReference"]').setValue('EC-2026-014');
  await addTags(wrapper, 'cueClasses', ['left-hand', 'right-hand']);
  await addTags(wrapper, 'channelNames', ['C3', 'Cz', 'C4']);
}

describe('StudyForm', () => {
  beforeEach(() => {
    setActivePinia(createPinia());
    resetCsrfToken();
  });
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('shows the server’s field errors on the fields they name', async () => {
    // The error body shape { error: { code, message, fields } } is the API contract of shared/api/errors.ts.
    const server = fakeServer({
      'POST /api/studies': {
        status: 409,
        body: { error: { code: 'duplicate-name', message: 'A study with this name exists', fields: { name: 'Already used by another study', 'channelNames.2': 'Listed twice' } } },
      },
    });
    const wrapper = mount(StudyForm, { attachTo: document.body });
    await fillValidStudy(wrapper);

    await wrapper.get('form').trigger('submit');
    await settle();

    // The request went out once the shared schema accepted the form, with the CSRF header.
    const post = server.sent.find((r) => r.method === 'POST');
    expect(post?.headers['x-csrf-token']).toBe('csrf-1');
    // Each message sits in its own form item, and only there.
    expect(itemOf(wrapper, 'name').get('.el-form-item__error').text()).toBe('Already used by another study');
    expect(itemOf(wrapper, 'channelNames').get('.el-form-item__error').text()).toBe('Entry 3: Listed twice');
    expect(itemOf(wrapper, 'ethicsReference').find('.el-form-item__error').exists()).toBe(false);
    expect(itemOf(wrapper, 'cueClasses').find('.el-form-item__error').exists()).toBe(false);
    expect(wrapper.get('[data-test="form-error"]').text()).toContain('A study with this name exists');
    wrapper.unmount();
  });

  it('checks the form with the shared schema before sending anything', async () => {
    const server = fakeServer({});
    const wrapper = mount(StudyForm, { attachTo: document.body });
    await wrapper.get('input[name="name"]').setValue('ab');

    await wrapper.get('form').trigger('submit');
    await settle();

    // Messages from shared/api/studies.ts (studyFieldsObject): name min 3, ethics reference required, >= 2 cue classes.
    expect(itemOf(wrapper, 'name').get('.el-form-item__error').text()).toBe('Use at least 3 characters');
    expect(itemOf(wrapper, 'ethicsReference').get('.el-form-item__error').text()).toBe('Enter the ethics approval reference');
    expect(itemOf(wrapper, 'cueClasses').get('.el-form-item__error').text()).toBe('Give at least 2 cue classes');
    expect(server.sent.filter((r) => r.method === 'POST')).toHaveLength(0);
    wrapper.unmount();
  });

  it('emits the saved study when the server accepts it', async () => {
    const created = {
      id: 7, name: 'Left vs right imagery', description: '', ethicsReference: 'EC-2026-014',
      cueClasses: ['left-hand', 'right-hand'], epochStartS: 0, epochEndS: 4, channelNames: ['C3', 'Cz', 'C4'],
      sampleRateHz: 160, powerLineHz: 50, recipe: 'component-tf', status: 'active',
      createdAt: '2026-01-05T10:00:00.000Z', createdBy: 2, createdByName: 'Ines Investigator', updatedAt: '2026-01-05T10:00:00.000Z',
    };
    const server = fakeServer({ 'POST /api/studies': { status: 201, body: created } });
    const wrapper = mount(StudyForm, { attachTo: document.body });
    await fillValidStudy(wrapper);

    await wrapper.get('form').trigger('submit');
    await settle();

    // The body carries exactly the fields of createStudyRequestSchema (shared/api/studies.ts).
    const post = server.sent.find((r) => r.method === 'POST');
    expect(Object.keys(post?.body as object).sort()).toEqual(
      ['channelNames', 'cueClasses', 'description', 'epochEndS', 'epochStartS', 'ethicsReference', 'name', 'powerLineHz', 'recipe', 'sampleRateHz']);
    expect(wrapper.emitted('saved')?.[0]?.[0]).toMatchObject({ id: 7, name: 'Left vs right imagery' });
    wrapper.unmount();
  });
});
