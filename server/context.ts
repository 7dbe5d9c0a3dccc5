/** What every service receives: configuration, database, mail, logger, clock. */
import type { Role } from '../shared/api';
import type { Config } from './config';
import type { Db } from './db/client';
import type { Logger } from './log';
import type { MailService } from './services/mail';

export interface AppContext {
  readonly config: Config;
  readonly db: Db;
  readonly mail: MailService;
  readonly log: Logger;
  /** Base URL users reach, without a trailing slash (links in mails). Known once the server listens. */
  publicUrl: string;
  now(): Date;
}

/** The signed-in user a service acts for (also `req.user`). */
export interface Actor {
  id: number;
  email: string;
  displayName: string;
  role: Role;
}
