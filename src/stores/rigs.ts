import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { CreateRigRequest, CreateRigResponse, Rig, UpdateRigRequest } from '@shared/api/rigs';
import { createRig, listRigs, updateRig } from '../api/rigs';
import { useLoadState } from '../composables/useLoadState';

/** Registered rigs (the rigs page now; pilot-session set-up later). The rig key is never stored here. */
export const useRigsStore = defineStore('rigs', () => {
  const items = ref<Rig[]>([]);
  const { status, error, track } = useLoadState();

  function load(): Promise<void> {
    return track(async () => {
      items.value = await listRigs();
    });
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
