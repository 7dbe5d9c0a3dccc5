import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { CreateParticipantRequest, Participant, UpdateParticipantRequest } from '@shared/api/participants';
import { createParticipant, listParticipants, updateParticipant } from '../api/participants';
import { useLoadState } from '../composables/useLoadState';

/**
 * Participants of one study at a time (the study page, and later the session set-up, read it).
 * Codes are pseudonymous; nothing here ever holds a name.
 */
export const useParticipantsStore = defineStore('participants', () => {
  const studyId = ref<number | null>(null);
  const items = ref<Participant[]>([]);
  const { status, error, track } = useLoadState();

  function load(forStudyId: number): Promise<void> {
    if (studyId.value !== forStudyId) items.value = [];
    studyId.value = forStudyId;
    return track(async () => {
      items.value = await listParticipants(forStudyId);
    });
  }

  function remember(p: Participant): Participant {
    if (p.studyId !== studyId.value) return p;
    const i = items.value.findIndex((x) => x.id === p.id);
    if (i >= 0) items.value.splice(i, 1, p);
    else items.value.push(p);
    return p;
  }

  async function create(forStudyId: number, body: CreateParticipantRequest): Promise<Participant> {
    return remember(await createParticipant(forStudyId, body));
  }

  async function update(forStudyId: number, participantId: number, body: UpdateParticipantRequest): Promise<Participant> {
    return remember(await updateParticipant(forStudyId, participantId, body));
  }

  return { studyId, items, status, error, load, create, update };
});
