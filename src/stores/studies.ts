import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { CreateStudyRequest, Study, UpdateStudyRequest } from '@shared/api/studies';
import { archiveStudy, createStudy, getStudy, listStudies, updateStudy, type StudyFilter } from '../api/studies';
import { useLoadState } from '../composables/useLoadState';

/**
 * Studies: the list (with its filter) and the study currently open. Mutations reject with
 * ApiError so forms can show field errors; they also keep the list and the open study in step.
 */
export const useStudiesStore = defineStore('studies', () => {
  const items = ref<Study[]>([]);
  const filter = ref<StudyFilter>({ includeArchived: false });
  const { status, error, track } = useLoadState();

  const current = ref<Study | null>(null);
  const { status: currentStatus, error: currentError, track: trackCurrent } = useLoadState();

  function load(next: StudyFilter = filter.value): Promise<void> {
    filter.value = { ...next };
    return track(async () => {
      items.value = await listStudies(filter.value);
    });
  }

  function open(studyId: number): Promise<void> {
    if (current.value?.id !== studyId) current.value = null;
    return trackCurrent(async () => {
      current.value = await getStudy(studyId);
    });
  }

  function remember(study: Study): Study {
    const i = items.value.findIndex((s) => s.id === study.id);
    const hiddenByFilter = study.status === 'archived' && !filter.value.includeArchived;
    if (i >= 0) {
      if (hiddenByFilter) items.value.splice(i, 1);
      else items.value.splice(i, 1, study);
    } else if (!hiddenByFilter) {
      items.value.unshift(study);
    }
    if (current.value?.id === study.id) current.value = study;
    return study;
  }

  async function create(body: CreateStudyRequest): Promise<Study> {
    return remember(await createStudy(body));
  }

  async function update(studyId: number, body: UpdateStudyRequest): Promise<Study> {
    return remember(await updateStudy(studyId, body));
  }

  async function archive(studyId: number): Promise<Study> {
    return remember(await archiveStudy(studyId));
  }

  return { items, filter, status, error, current, currentStatus, currentError, load, open, create, update, archive };
});
