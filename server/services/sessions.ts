/**
 * Pilot sessions: an experimenter sets one up (study, consenting participant, rig, frozen
 * decoder), starts it on the rig's feed, pauses, resumes, annotates, marks trials and stops it;
 * the live engine (server/live) does the signal work. Lists and details merge the stored rows
 * with the engine's live state.
 */
import {
  type CreateSessionRequest, type DisplayLink, type OfflineFigures, type SessionDetail, type SessionEvent, type SessionSummary,
  type Trial, type UpdateTrialRequest,
} from '../../shared/api';
import { findParticipant } from '../db/queries/participants';
import {
  activeSessionsOfRig, embeddedProfileOf, findDecoder, findPilotSession, findTrial, insertDisplayToken, insertPilotSession,
  listEvents, listPilotSessions, listTrials, trialCounts, updatePilotSession, updateTrial, useDisplayToken, type SessionWithNames,
} from '../db/queries/pilot-sessions';
import { findRigById } from '../db/queries/rigs';
import type { DecoderRow, SessionEventRow, TrialRow } from '../db/schema';
import type { Actor, AppContext } from '../context';
import { AppError, notFound } from '../errors';
import type { LiveEngine } from '../live/engine';
import type { LiveDecoder } from '../live/live-decoder';
import { LiveSession } from '../live/live-session';
import { writeAudit } from './audit';
import { newToken, sha256Hex } from './passwords';
import { getActiveStudy, getStudyOr404 } from './studies';
import { trialsCsv } from './sessions-csv';

/** How long a display link stays usable. */
export const DISPLAY_LINK_TTL_MS = 12 * 3_600_000;

export function toTrial(r: TrialRow): Trial {
  const probability = Math.max(...r.probabilities);
  return {
    id: r.id, cueId: r.cueId, sampleIndex: r.sampleIndex, onsetS: r.onsetS, trueClass: r.trueClass, predictedClass: r.predictedClass,
    probability, probabilities: r.probabilities, correct: r.trueClass === null ? null : r.trueClass === r.predictedClass,
    latency: r.latency, flags: r.flags, excluded: r.flags.length > 0 || r.markedBad, markedBad: r.markedBad, note: r.note,
    createdAt: r.createdAt.toISOString(),
  };
}

export function toEvent(e: SessionEventRow): SessionEvent {
  return { id: e.id, at: e.at.toISOString(), kind: e.kind, text: e.text, sampleIndex: e.sampleIndex };
}

function offlineOf(d: DecoderRow): OfflineFigures {
  const m = d.metrics;
  const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  const w = m.wilson95;
  const wilson = Array.isArray(w) && w.length === 2 && typeof w[0] === 'number' && typeof w[1] === 'number' ? [w[0], w[1]] as [number, number] : null;
  return { cvAccuracy: num(m.cvAccuracy), wilson95: wilson, chanceThreshold95: num(m.chanceThreshold95) };
}

export function sessionService(ctx: AppContext, engine: LiveEngine) {
  const { db } = ctx;
  const decoders = new Map<string, LiveDecoder>();

  function liveDecoder(row: DecoderRow): LiveDecoder {
    const key = `${row.id}:${row.sha256}`;
    let d = decoders.get(key);
    if (!d) {
      try { d = engine.options.loadDecoder(row); } catch (e) {
        throw new AppError('decoder-unloadable', `The decoder cannot run live: ${e instanceof Error ? e.message : String(e)}`, 409);
      }
      decoders.set(key, d);
    }
    return d;
  }

  function summaryOf(row: SessionWithNames): SessionSummary {
    const live = engine.sessions.get(row.id);
    if (live) return live.summary();
    return {
      id: row.id, studyId: row.studyId, studyName: row.studyName, participantId: row.participantId, participantCode: row.participantCode,
      rigId: row.rigId, rigName: row.rigName, decoderId: row.decoderId, decoderName: row.decoderName, decoderSha256: row.decoderSha256,
      status: row.status, createdAt: row.createdAt.toISOString(), startedAt: row.startedAt?.toISOString() ?? null,
      stoppedAt: row.stoppedAt?.toISOString() ?? null,
      counts: { ...trialCounts(db, row.id), droppedSamples: row.droppedSamples, gaps: row.gapCount },
    };
  }

  function rowOr404(sessionId: number): SessionWithNames {
    const row = findPilotSession(db, sessionId);
    if (!row) throw notFound('Session');
    return row;
  }

  /** The engine's session for an unstopped row (re-created after a server restart for a ready session). */
  function active(row: SessionWithNames): LiveSession {
    const existing = engine.sessions.get(row.id);
    if (existing) return existing;
    if (row.status === 'stopped') throw new AppError('session-stopped', 'This session has stopped', 409);
    const decoder = liveDecoder(findDecoder(db, row.decoderId)!);
    const { status: _status, counts, startedAt: _started, stoppedAt: _stopped, ...identity } = summaryOf(row);
    const s = new LiveSession(identity, decoder, row.status, counts, row.startedAt?.getTime() ?? null, null, engine.sessionEnv());
    engine.register(s);
    return s;
  }

  function detail(row: SessionWithNames): SessionDetail {
    const decoder = findDecoder(db, row.decoderId)!;
    const live = engine.sessions.get(row.id);
    const feed = live?.feedState() ?? { connected: false, channelNames: [], sampleRateHz: null, samplesReceived: 0, lagMs: null,
      lastSeq: 0 };
    return { ...summaryOf(row), feed, offline: offlineOf(decoder), classes: decoder.classes, epochStartS: decoder.epochStartS,
      epochEndS: decoder.epochEndS, notes: row.notes };
  }

  async function transition(sessionId: number, actor: Actor, from: readonly string[], to: 'running' | 'paused' | 'stopped',
                            kind: 'start' | 'pause' | 'resume' | 'stop'): Promise<SessionDetail> {
    const row = rowOr404(sessionId);
    const s = active(row);
    if (!from.includes(s.status)) {
      throw new AppError('session-state', `Cannot ${kind} a session that is ${s.status}`, 409);
    }
    const now = ctx.now();
    let sampleIndex: number | null = s.pipeline?.nextSample ?? null;
    if (kind === 'start') {
      // Consent may have been withdrawn since the session was set up.
      const participant = findParticipant(db, row.studyId, row.participantId);
      if (participant?.consentStatus !== 'given') {
        throw new AppError('consent-missing', `Participant ${row.participantCode} has not given consent`, 409);
      }
      const { feed, startSample } = engine.run(s, embeddedProfileOf(db, row.rigId));
      updatePilotSession(db, s.id, { status: 'running', feedId: feed.feedId, startSample, startedAt: now });
      s.startedAtMs = now.getTime();
      sampleIndex = startSample;
    } else if (kind === 'stop') {
      const stopSample = engine.halt(s);
      updatePilotSession(db, s.id, { status: 'stopped', stopSample, stoppedAt: now });
      s.stoppedAtMs = now.getTime();
      sampleIndex = stopSample;
    } else {
      updatePilotSession(db, s.id, { status: to });
    }
    s.status = to;
    writeAudit(db, actor, { action: `session.${kind}`, targetType: 'pilot-session', targetId: s.id, details: { sampleIndex } }, now);
    await engine.event(s.id, kind, `${actor.displayName}: ${kind}`, sampleIndex);
    s.broadcastStatus();
    s.hub.display({ type: 'state', status: to });
    if (to === 'stopped') {
      s.close('session stopped');
      engine.unregister(s);
    }
    return detail(rowOr404(sessionId));
  }

  return {
    list(studyId?: number): SessionSummary[] {
      return listPilotSessions(db, studyId).map(summaryOf);
    },

    get(sessionId: number): SessionDetail {
      return detail(rowOr404(sessionId));
    },

    create(input: CreateSessionRequest, actor: Actor): SessionSummary {
      const now = ctx.now();
      getActiveStudy(db, input.studyId);
      const participant = findParticipant(db, input.studyId, input.participantId);
      if (!participant) throw notFound('Participant');
      if (participant.consentStatus !== 'given') {
        throw new AppError('consent-missing', `Participant ${participant.code} has not given consent (${participant.consentStatus})`, 409);
      }
      const rig = findRigById(db, input.rigId);
      if (!rig || rig.retired) throw notFound('Rig');
      const decoder = findDecoder(db, input.decoderId);
      if (!decoder) throw notFound('Decoder');
      if (decoder.studyId !== input.studyId) throw new AppError('decoder-study-mismatch', 'The decoder belongs to another study', 409);
      if (decoder.status !== 'frozen') throw new AppError('decoder-not-frozen', 'Only a frozen decoder can run a session', 409);
      liveDecoder(decoder);
      if (activeSessionsOfRig(db, rig.id).length > 0 || engine.sessionOfRig(rig.id)) {
        throw new AppError('rig-busy', `Rig ${rig.name} already has a session that has not stopped`, 409);
      }
      const row = db.transaction(() => {
        const r = insertPilotSession(db, { studyId: input.studyId, participantId: participant.id, rigId: rig.id, decoderId: decoder.id,
          notes: input.notes ?? '', createdBy: actor.id }, now);
        writeAudit(db, actor, { action: 'session.create', targetType: 'pilot-session', targetId: r.id,
          details: { studyId: r.studyId, participantId: r.participantId, rigId: r.rigId, decoderId: r.decoderId } }, now);
        return r;
      });
      const withNames = rowOr404(row.id);
      active(withNames);
      return summaryOf(withNames);
    },

    start: (id: number, actor: Actor) => transition(id, actor, ['ready'], 'running', 'start'),
    pause: (id: number, actor: Actor) => transition(id, actor, ['running'], 'paused', 'pause'),
    resume: (id: number, actor: Actor) => transition(id, actor, ['paused'], 'running', 'resume'),
    stop: (id: number, actor: Actor) => transition(id, actor, ['ready', 'running', 'paused'], 'stopped', 'stop'),

    async annotate(sessionId: number, text: string, actor: Actor): Promise<SessionEvent> {
      const row = rowOr404(sessionId);
      const sample = engine.sessions.get(row.id)?.pipeline?.nextSample ?? null;
      return engine.event(row.id, 'annotation', `${actor.displayName}: ${text}`, sample);
    },

    events(sessionId: number): SessionEvent[] {
      rowOr404(sessionId);
      return listEvents(db, sessionId).map(toEvent);
    },

    trials(sessionId: number): Trial[] {
      rowOr404(sessionId);
      return listTrials(db, sessionId).map(toTrial);
    },

    async trialsCsv(sessionId: number): Promise<{ csv: string; fileName: string }> {
      const row = rowOr404(sessionId);
      await engine.store.flush();
      const decoder = findDecoder(db, row.decoderId)!;
      return { csv: trialsCsv(listTrials(db, sessionId).map(toTrial), decoder.classes), fileName: `session-${row.id}-trials.csv` };
    },

    async updateTrial(sessionId: number, trialId: number, input: UpdateTrialRequest, actor: Actor): Promise<Trial> {
      rowOr404(sessionId);
      await engine.store.flush();
      if (!findTrial(db, sessionId, trialId)) throw notFound('Trial');
      const now = ctx.now();
      const updated = db.transaction(() => {
        const t = updateTrial(db, trialId, { ...(input.markedBad !== undefined ? { markedBad: input.markedBad } : {}),
          ...(input.note !== undefined ? { note: input.note } : {}) })!;
        writeAudit(db, actor, { action: 'trial.update', targetType: 'trial', targetId: trialId, details: { sessionId, ...input } }, now);
        return t;
      });
      engine.sessions.get(sessionId)?.trialMarked(trialId, updated.markedBad, updated.note);
      return toTrial(updated);
    },

    displayLink(sessionId: number, actor: Actor): DisplayLink {
      const row = rowOr404(sessionId);
      if (row.status === 'stopped') throw new AppError('session-stopped', 'This session has stopped', 409);
      const now = ctx.now();
      const { token, hash } = newToken();
      const expiresAt = new Date(now.getTime() + DISPLAY_LINK_TTL_MS);
      insertDisplayToken(db, { sessionId, tokenHash: hash, expiresAt, createdBy: actor.id }, now);
      writeAudit(db, actor, { action: 'session.display-link', targetType: 'pilot-session', targetId: sessionId, details: {} }, now);
      return { url: `/display/${token}`, expiresAt: expiresAt.toISOString() };
    },

    /** Uses a display token (once): the live session it opens, or null. */
    useDisplayToken(token: string): LiveSession | null {
      if (!/^[A-Za-z0-9_-]{43}$/.test(token)) return null;
      const sessionId = useDisplayToken(db, sha256Hex(token), ctx.now());
      if (sessionId === null) return null;
      const row = findPilotSession(db, sessionId);
      return row && row.status !== 'stopped' ? active(row) : null;
    },

    /** The live session of a row (console socket), or null when stopped or unknown. */
    liveSession(sessionId: number): { session: LiveSession | null; detail: SessionDetail } | null {
      const row = findPilotSession(db, sessionId);
      if (!row) return null;
      return { session: row.status === 'stopped' ? null : active(row), detail: detail(row) };
    },

    /** Checks a study id for listing (404 when unknown). */
    checkStudy(studyId: number): void { getStudyOr404(db, studyId); },
  };
}
export type SessionService = ReturnType<typeof sessionService>;
