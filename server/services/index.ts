/** All services of the app, built once per server from its context. */
import type { AppContext } from '../context';
import { auditService } from './audit';
import { decoderService } from './decoders';
import { defaultDecoderLoader } from '../live/decoder-loader';
import { LiveEngine } from '../live/engine';
import { authService } from './auth';
import { outboxService } from './outbox';
import { participantService } from './participants';
import { recordingService } from './recordings';
import { reviewService } from './review';
import { rigService } from './rigs';
import { sessionService } from './sessions';
import { studyService } from './studies';
import { trainingJobService } from './training-jobs';
import { userService } from './users';

export function createServices(ctx: AppContext) {
  // The live engine: feeds, running pilot sessions, their sockets (server/live, server/ws).
  const live = LiveEngine.create(ctx, { loadDecoder: defaultDecoderLoader });
  return {
    live,
    // The gap review rides on the sessions service (its routes live under /api/sessions/:id/review).
    sessions: { ...sessionService(ctx, live), review: reviewService(ctx, live) },
    auth: authService(ctx),
    users: userService(ctx),
    rigs: rigService(ctx),
    audit: auditService(ctx),
    outbox: outboxService(ctx),
    studies: studyService(ctx),
    participants: participantService(ctx),
    recordings: recordingService(ctx),
    decoders: decoderService(ctx),
    trainingJobs: trainingJobService(ctx, { concurrency: ctx.config.trainingConcurrency }),
  };
}
export type Services = ReturnType<typeof createServices>;
