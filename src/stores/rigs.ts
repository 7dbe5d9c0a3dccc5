import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { CreateRigRequest, CreateRigResponse, Rig, UpdateRigRequest } from '@shared/api/rigs';
import { createRig, listRigs, updateRig } from '../api/rigs';
import { toApiError, type ApiError } from '../api/http';

/** Registered rigs (the rigs page now; pilot-session set-up later). The rig key is never stored here. */
export const useRigsStore = defineStore('rigs', () => {
  const items = ref<Rig[]>([]);
  const status = ref<'idle' | 'loading' | 'ready' | 'error'>('idle');
  const error = ref<ApiError | null>(null);

  async function load(): Promise<void> {
    status.value = 'loading';
    error.value = null;
    try {
      items.value = await listRigs();
      status.value = 'ready';
    } catch (e) {
      error.value = toApiError(e);
      status.value = 'error';
    }
  }

  function remember(rig: Rig): Rig {
    const i = items.value.findIndex((r) => r.id === rig.id);
    if (i >= 0) items.value.splice(i, 1, rig);
    else items.value.push(rig);
    return rig;
  }

  /** Returns the key with the rig so the caller can show it once; only the rig is kept. */
  async function register(body: CreateRigRequest): Promise<CreateRigResponse> {
    const created = await createRig(body);
    remember(created.rig);
    return created;
  }

  async function update(rigId: number, body: UpdateRigRequest): Promise<Rig> {
    return remember(await updateRig(rigId, body));
  }

  return { items, status, error, load, register, update };
});
