import { onBeforeUnmount, ref, shallowRef, watch } from 'vue';
import type { CreateTrainingJobRequest, TrainingJob } from '@shared/api/training-jobs';
import { toApiError, type ApiError } from '../api/http';
import { createTrainingJob, listTrainingJobs } from '../api/training-jobs';

/**
 * A study's training jobs, polled while any is queued or running. `onFinished` is called once
 * for each job started from this page when it ends (done or failed).
 */
export function useTrainingJobs(studyId: () => number, onFinished: (job: TrainingJob) => void, pollMs = 1500) {
  const jobs = shallowRef<TrainingJob[]>([]);
  const error = shallowRef<ApiError | null>(null);
  const status = ref<'idle' | 'loading' | 'ready' | 'error'>('idle');
  const watched = new Set<number>();
  let timer: ReturnType<typeof setTimeout> | null = null;
  let alive = true;

  const active = (j: TrainingJob) => j.status === 'queued' || j.status === 'running';

  async function load(): Promise<void> {
    if (timer) clearTimeout(timer);
    timer = null;
    if (status.value !== 'ready') status.value = 'loading';
    try {
      jobs.value = await listTrainingJobs(studyId());
      status.value = 'ready';
      error.value = null;
    } catch (e) {
      error.value = toApiError(e);
      status.value = 'error';
    }
    for (const j of jobs.value) {
      if (watched.has(j.id) && !active(j)) {
        watched.delete(j.id);
        onFinished(j);
      }
    }
    if (alive && (jobs.value.some(active) || watched.size > 0)) timer = setTimeout(() => void load(), pollMs);
  }

  async function start(body: CreateTrainingJobRequest): Promise<TrainingJob> {
    const job = await createTrainingJob(studyId(), body);
    watched.add(job.id);
    jobs.value = [job, ...jobs.value.filter((j) => j.id !== job.id)];
    void load();
    return job;
  }

  watch(studyId, () => {
    watched.clear();
    void load();
  }, { immediate: true });

  onBeforeUnmount(() => {
    alive = false;
    if (timer) clearTimeout(timer);
  });

  return { jobs, status, error, load, start };
}
