import { ref, type ShallowRef } from 'vue';
import type { DisplayLink, SessionDetail, Trial, UpdateTrialRequest } from '@shared/api/sessions';
import { toApiError, type ApiError } from '../api/http';
import { annotateSession, createDisplayLink, sessionAction, updateTrial, type SessionAction } from '../api/sessions';

/**
 * The console's commands: start/pause/resume/stop, annotations, trial marks and the participant
 * display link. Each answer is folded into the live state at once (the socket confirms it later).
 */
export function useSessionControls(sessionId: () => number, session: ShallowRef<SessionDetail | null>,
  trials: ShallowRef<Trial[]>) {
  const busy = ref<SessionAction | 'annotate' | 'link' | null>(null);
  const error = ref<ApiError | null>(null);

  async function guarded<T>(what: NonNullable<typeof busy.value>, work: () => Promise<T>): Promise<T | null> {
    busy.value = what;
    error.value = null;
    try {
      return await work();
    } catch (e) {
      error.value = toApiError(e);
      return null;
    } finally {
      busy.value = null;
    }
  }

  async function run(action: SessionAction): Promise<boolean> {
    const detail = await guarded(action, () => sessionAction(sessionId(), action));
    if (detail) session.value = detail;
    return detail !== null;
  }

  async function annotate(text: string): Promise<boolean> {
    return (await guarded('annotate', () => annotateSession(sessionId(), text))) !== null;
  }

  /** Mark a trial bad (kept out of accuracy) or attach a note; errors land in `error`. */
  async function editTrial(trialId: number, body: UpdateTrialRequest): Promise<void> {
    try {
      const updated = await updateTrial(sessionId(), trialId, body);
      trials.value = trials.value.map((t) => (t.id === updated.id ? updated : t));
    } catch (e) {
      error.value = toApiError(e);
    }
  }

  async function displayLink(): Promise<DisplayLink | null> {
    return guarded('link', () => createDisplayLink(sessionId()));
  }

  return { busy, error, run, annotate, editTrial, displayLink };
}
