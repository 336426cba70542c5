import type { IntakeFileDto, IntakeQuery as IntakeQueryParams, IntakeStatus } from '@equilight/contracts';

export type { IngestReceipt, IntakePage, IntakeStatus } from '@equilight/contracts';
export { INTAKE_STATUSES, INTAKE_STATUS_DISPLAY as STATUS_DISPLAY } from '@equilight/contracts';

/** One received file as the API lists it. */
export type IntakeFile = IntakeFileDto;

export type IntakeSort = NonNullable<IntakeQueryParams['sort']>;

export interface IntakeQuery {
  status: IntakeStatus | '';
  profileId: number | null;
  q: string;
  sort: IntakeSort;
  dir: NonNullable<IntakeQueryParams['dir']>;
  page: number;
  pageSize: number;
}
