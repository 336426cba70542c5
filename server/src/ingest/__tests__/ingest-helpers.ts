import type TestAgent from 'supertest/lib/agent';
import type { TestApp } from '../../testing/test-app';
import type { IntakeFileDto } from '../ingest.service';
import { testQuery } from '../../testing/test-app';

export const LONG_TABLE_PROFILE = {
  name: 'Reader 1 (long table)',
  kind: 'plate_reader',
  plateFormat: '96',
  fileFormat: 'long_table',
  dropSubfolder: 'reader-1',
  fileNamePattern: '^(?<run>RUN-\\d+)',
};

/** A long-table export with one reading per well of a 96-well plate; `seed` makes the content distinct. */
export function longTableCsv(seed: number, wavelengthNm = 450): string {
  const lines = ['position,wavelength_nm,absorbance'];
  for (const row of 'ABCDEFGH') {
    for (let col = 1; col <= 12; col++) {
      lines.push(
        `${row}${col},${wavelengthNm},${(0.05 + ((seed * 7 + col * 13 + row.charCodeAt(0)) % 97) / 100).toFixed(4)}`,
      );
    }
  }
  return `${lines.join('\n')}\n`;
}

export async function createProfile(admin: TestAgent, body: Record<string, unknown> = LONG_TABLE_PROFILE) {
  const res = await admin.post('/api/instruments').send(body);
  if (res.status !== 201) throw new Error(`profile not created: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as { profile: { id: number }; token: string };
}

/** Wait until a received file reaches a final state (the queue works in the background). */
export async function settled(t: TestApp, id: number, timeoutMs = 10_000): Promise<IntakeFileDto> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const file = await t.services.ingest.getDto(id);
    if (!['queued', 'parsing'].includes(file.status)) return file;
    if (Date.now() > deadline) throw new Error(`file ${id} still ${file.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

export async function readingCount(t: TestApp, intakeFileId?: number): Promise<number> {
  const rows = intakeFileId
    ? await testQuery(t.dataSource, 'SELECT COUNT(*) AS n FROM readings WHERE intake_file_id = ?', [
        intakeFileId,
      ])
    : await testQuery(t.dataSource, 'SELECT COUNT(*) AS n FROM readings');
  return Number(rows[0].n);
}
