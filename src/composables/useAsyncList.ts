import { ref, type Ref } from 'vue';
import { useLoadState } from './useLoadState';

/**
 * Page-only list state: load with a fetcher, keep status and error, replace one row after an
 * update. For lists several pages share, use a store instead.
 */
export function useAsyncList<T extends { id: number }>(fetcher: () => Promise<T[]>) {
  const items = ref([]) as Ref<T[]>;
  const { status, error, track } = useLoadState();

  function load(): Promise<void> {
    return track(async () => {
      items.value = await fetcher();
    });
  }

  /** Put `row` in place of the row with its id, or append it. */
  function upsert(row: T): void {
    const i = items.value.findIndex((x) => x.id === row.id);
    if (i >= 0) items.value.splice(i, 1, row);
    else items.value.push(row);
  }

  return { items, status, error, load, upsert };
}
