/**
 * The gap review of a stopped pilot session (shared/api/review.ts): gathers the stored rows
 * (session, trials, feed rate, the decoder's training report) and hands them to the pure
 * computation in shared/review/gap-review.ts. The PDF and the mail to the investigator build on
 * the same review (review-pdf.ts, review-mail.ts).
 */
import type { GapReview, ReviewMailResult } from '../../shared/api/review';
import { computeGapReview, type OfflineInput, type ReplayInput, type ReviewTrial } from '../../shared/review/gap-review';
import { findFeedById } from '../db/queries/feed';
import { findDecoder, findPilotSession, listTrials } from '../db/queries/pilot-sessions';
import type { DecoderRow } from '../db/schema';
import { findStudy } from '../db/queries/studies';
import { findUserById } from '../db/queries/users';
import type { Actor, AppContext } from '../context';
import { AppError, notFound } from '../errors';
import type { LiveEngine } from '../live/engine';
import { offlineTrials } from '../live/offline';
import { writeAudit } from './audit';
import { reviewMail } from './review-mail';
import { reviewPdf } from './review-pdf';

/** The caution every review carries (DESIGN.md, "Cautions the product shows"). */
export const REVIEW_CAUTION = 'Research use only. Not a medical device; not for diagnostic or clinical decisions.';

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/**
 * The decoder's nested-CV figures: the training report's nestedCvAccuracy, trials and
 * foldAccuracies, else the headline metrics (cvAccuracy, trials) without folds; null without both.
 */
export function offlineInputOf(d: Pick<DecoderRow, 'report' | 'metrics'>): OfflineInput | null {
  const r = d.report ?? {}, m = d.metrics;
  const accuracy = num(r.nestedCvAccuracy) ?? num(m.cvAccuracy);
  const trials = num(r.trials) ?? num(m.trials);
  if (accuracy === null || trials === null || !Number.isInteger(trials) || trials < 1) return null;
  const folds = Array.isArray(r.foldAccuracies) ? r.foldAccuracies.filter((v): v is number => num(v) !== null) : [];
  return { accuracy, trials, foldAccuracies: folds };
}

export function reviewService(ctx: AppContext, engine: LiveEngine) {
  const { db } = ctx;
  // A stopped session's samples and predictions no longer change: one re-run per session and decoder.
  const replays = new Map<string, ReplayInput>();

  /**
   * Online against offline on the stored samples (server/live/offline.ts), or why that could not
   * run. The re-run is synchronous on the main thread (a few seconds for a long component-tf
   * session), so it waits while any session is decoding live rather than delay its trials.
   */
  function replayOf(sessionId: number, decoder: DecoderRow): ReplayInput {
    const key = `${sessionId}:${decoder.sha256}`;
    let r = replays.get(key);
    if (!r && [...engine.sessions.values()].some((live) => live.status === 'running')) {
      return { unavailable: 'another session is decoding live; the re-run waits until none is, so as not to delay its trials' };
    }
    if (!r) {
      try {
        const live = engine.options.loadDecoder(decoder);
        r = { trials: offlineTrials(db, sessionId, live).map((t) => ({ online: t.online, offline: t.offline })) };
      } catch (e) {
        r = { unavailable: e instanceof Error ? e.message : String(e) };
      }
      replays.set(key, r);
    }
    return r;
  }

  const svc = {
    /** The review; 404 unknown session, 409 'session-not-stopped' before it stopped. */
    async get(sessionId: number): Promise<GapReview> {
      const s = findPilotSession(db, sessionId);
      if (!s) throw notFound('Session');
      if (s.status !== 'stopped') {
        throw new AppError('session-not-stopped', 'The gap review is available once the session has stopped', 409);
      }
      await engine.store.flush();
      const decoder = findDecoder(db, s.decoderId)!;
      const classIndex = new Map(decoder.classes.map((c, i) => [c, i]));
      const rows = listTrials(db, sessionId).sort((a, b) => a.sampleIndex - b.sampleIndex || a.cueId - b.cueId);
      const trials: ReviewTrial[] = rows.map((t) => ({
        onsetS: t.onsetS, trueClass: t.trueClass === null ? null : classIndex.get(t.trueClass) ?? null,
        predictedClass: classIndex.get(t.predictedClass) ?? -1, probabilities: t.probabilities, flags: t.flags, markedBad: t.markedBad,
        totalLatencyMs: t.latency.totalMs,
      }));
      const feed = s.feedId !== null ? findFeedById(db, s.feedId) : undefined;
      const rate = feed?.sampleRateHz ?? null;
      const durationS = rate && s.startSample !== null && s.stopSample !== null ? (s.stopSample - s.startSample) / rate
        : s.startedAt && s.stoppedAt ? (s.stoppedAt.getTime() - s.startedAt.getTime()) / 1000 : null;
      const core = computeGapReview({
        classes: decoder.classes, trials, offline: offlineInputOf(decoder), droppedSamples: s.droppedSamples, gapCount: s.gapCount,
        sampleRateHz: rate, durationS, epochEndS: decoder.epochEndS,
        replay: s.feedId === null || s.startSample === null ? { unavailable: 'the session never received samples' } : replayOf(s.id, decoder),
      });
      return {
        sessionId: s.id, studyId: s.studyId, studyName: s.studyName, participantCode: s.participantCode, rigName: s.rigName,
        decoderId: s.decoderId, decoderName: s.decoderName, decoderSha256: s.decoderSha256, classes: decoder.classes,
        startedAt: s.startedAt?.toISOString() ?? null, stoppedAt: s.stoppedAt?.toISOString() ?? null,
        generatedAt: ctx.now().toISOString(), ...core, caution: REVIEW_CAUTION,
      };
    },

    /** The review as a PDF and its file name (same refusals as `get`). */
    async pdf(sessionId: number): Promise<{ pdf: Buffer; fileName: string }> {
      const r = await svc.get(sessionId);
      return { pdf: await reviewPdf(r), fileName: `session-${r.sessionId}-gap-review.pdf` };
    },

    /**
     * Mails the review with its PDF to the study's investigator (the study's owner); audited as
     * 'session.review-mail'. 409 'no-investigator' when the owner's account is disabled or gone.
     */
    async mail(sessionId: number, actor: Actor): Promise<ReviewMailResult> {
      const r = await svc.get(sessionId);
      const study = findStudy(db, r.studyId);
      const owner = study ? findUserById(db, study.createdBy) : undefined;
      if (!owner || owner.disabled) {
        throw new AppError('no-investigator', "The study's investigator has no active account to send the review to", 409);
      }
      const msg = reviewMail(r, owner, `${ctx.publicUrl}/sessions/${r.sessionId}/review`, actor.displayName, await reviewPdf(r));
      const { messageId } = await ctx.mail.sendMail(msg);
      writeAudit(db, actor, { action: 'session.review-mail', targetType: 'pilot-session', targetId: r.sessionId,
        details: { to: owner.email, messageId } }, ctx.now());
      return { to: owner.email, subject: msg.subject, messageId };
    },
  };
  return svc;
}
export type ReviewService = ReturnType<typeof reviewService>;
