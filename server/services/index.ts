/** All services of the app, built once per server from its context. */
import type { AppContext } from '../context';
import { auditService } from './audit';
import { authService } from './auth';
import { outboxService } from './outbox';
import { participantService } from './participants';
import { recordingService } from './recordings';
import { rigService } from './rigs';
import { studyService } from './studies';
import { userService } from './users';

export function createServices(ctx: AppContext) {
  return {
    auth: authService(ctx),
    users: userService(ctx),
    rigs: rigService(ctx),
    audit: auditService(ctx),
    outbox: outboxService(ctx),
    studies: studyService(ctx),
    participants: participantService(ctx),
    recordings: recordingService(ctx),
  };
}
export type Services = ReturnType<typeof createServices>;
