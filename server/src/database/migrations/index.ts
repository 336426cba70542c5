import { Initial1764600000000 } from './1764600000000-initial';
import { Ingestion1764610000000 } from './1764610000000-ingestion';
import { Batches1764620000000 } from './1764620000000-batches';
import { Mail1764630000000 } from './1764630000000-mail';
import { SessionOwnerHardenA1764700001000 } from './1764700001000-session-owner';
import { FrozenResults1764648000000 } from './1764648000000-frozen-results';
import { WebhooksBranchWebhooks1764800000000 } from './1764800000000-webhooks';
import { Watchers1764900000000 } from './1764900000000-watchers';
import { BatchSummaries1765000000000 } from './1765000000000-batch-summaries';
import { BatchComments1765030000000 } from './1765030000000-batch-comments';
import { YearsOfBatches1765100000000 } from './1765100000000-years-of-batches';
import { TemperatureColumns1765200000000 } from './1765200000000-temperature-columns';
import { TemperatureSystems1765300000000 } from './1765300000000-temperature-systems';

/** Every migration, oldest first. Add new ones at the end. */
export const migrations = [
  Initial1764600000000,
  Ingestion1764610000000,
  Batches1764620000000,
  Mail1764630000000,
  SessionOwnerHardenA1764700001000,
  FrozenResults1764648000000,
  WebhooksBranchWebhooks1764800000000,
  Watchers1764900000000,
  BatchSummaries1765000000000,
  BatchComments1765030000000,
  YearsOfBatches1765100000000,
  TemperatureColumns1765200000000,
  TemperatureSystems1765300000000,
];
