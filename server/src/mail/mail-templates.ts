import type { QcFlag } from '../analysis';
import { minute } from '../reports/report-cells';

/** A mail's content: a subject, a plain-text part and a simple HTML part saying the same. */
export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

export function escapeHtml(text: string): string {
  return text.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c,
  );
}

/** Subject lines are one line: no line breaks from user-given names. */
function oneLine(text: string): string {
  return text.replace(/[\r\n]+/g, ' ').trim();
}

type Block =
  | { kind: 'p'; text: string }
  | { kind: 'list'; items: string[] }
  | { kind: 'link'; label: string; url: string };

function compose(subject: string, greeting: string, blocks: Block[]): MailContent {
  const footer =
    'This message was sent by Equilight. Change which mails you get under Notification settings.';
  const text = [
    greeting,
    '',
    ...blocks.flatMap((b) =>
      b.kind === 'p'
        ? [b.text, '']
        : b.kind === 'list'
          ? [...b.items.map((i) => `  - ${i}`), '']
          : [`${b.label}: ${b.url}`, ''],
    ),
    '-- ',
    footer,
  ].join('\n');
  const body = blocks
    .map((b) =>
      b.kind === 'p'
        ? `<p>${escapeHtml(b.text)}</p>`
        : b.kind === 'list'
          ? `<ul>${b.items.map((i) => `<li>${escapeHtml(i)}</li>`).join('')}</ul>`
          : `<p><a href="${escapeHtml(b.url)}">${escapeHtml(b.label)}</a></p>`,
    )
    .join('\n');
  const html = `<!doctype html>
<html><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="font-family: 'Noto Sans', Arial, sans-serif; font-size: 14px; color: #1b1b1f; line-height: 1.5">
<p>${escapeHtml(greeting)}</p>
${body}
<hr style="border: none; border-top: 1px solid #ccc">
<p style="font-size: 12px; color: #555">${escapeHtml(footer)}</p>
</body></html>`;
  return { subject: oneLine(subject), text, html };
}

export interface BatchSummary {
  id: number;
  name: string;
  instrument: string | null;
  fileCount: number;
  url: string;
  /** Best stoichiometry and its K as the batch page states it (formatK: value and interval, bound, or reason). */
  best: { model: string; kText: string } | null;
  verdict: string | null;
  errorFlags: number;
  /** One sentence per control (`describeControl`): its concentration, nominal value and recovery. */
  controls: string[];
}

/** The best stoichiometry and its K, one line each; one place for every mail that states K. */
function kLines(best: BatchSummary['best']): string[] {
  if (!best) return ['No equilibrium constant was computed for this batch.'];
  return [`Best stoichiometry: ${best.model}`, `K = ${best.kText}`];
}

export function batchCompleteMail(name: string, s: BatchSummary): MailContent {
  const lines: string[] = [`Instrument: ${s.instrument ?? 'unknown'}`, `Files stored: ${s.fileCount}`];
  lines.push(...kLines(s.best));
  lines.push(...s.controls.map((c) => `Control ${c}`));
  if (s.errorFlags) lines.push(`QC errors: ${s.errorFlags} (a separate mail lists them)`);
  const blocks: Block[] = [
    {
      kind: 'p',
      text: `All expected files of batch "${s.name}" have arrived and the batch has been analysed.`,
    },
    { kind: 'list', items: lines },
  ];
  if (s.verdict) blocks.push({ kind: 'p', text: s.verdict });
  blocks.push({ kind: 'link', label: 'Open the batch', url: s.url });
  return compose(`Batch complete: ${s.name}`, `Hello ${name},`, blocks);
}

export function qcFailureMail(
  name: string,
  batch: { name: string; url: string },
  flags: QcFlag[],
): MailContent {
  return compose(`QC errors in batch ${batch.name}`, `Hello ${name},`, [
    {
      kind: 'p',
      text: `Batch "${batch.name}" is complete, but its quality checks found ${flags.length} error${flags.length === 1 ? '' : 's'} that need a look before review:`,
    },
    {
      kind: 'list',
      items: flags.map((f) => `${f.position ? `${f.position}: ` : ''}${f.message} [${f.code}]`),
    },
    { kind: 'link', label: 'Open the batch', url: batch.url },
  ]);
}

export function batchApprovedMail(
  name: string,
  batch: {
    name: string;
    url: string;
    approver: string;
    comment: string;
    approvedAt: string | null;
    /** The approved result, from the approval record (absent when there is none). */
    record?: { id: number; engineVersion: string; best: BatchSummary['best'] };
  },
): MailContent {
  const blocks: Block[] = [
    {
      kind: 'p',
      text: `${batch.approver} approved batch "${batch.name}"${batch.approvedAt ? ` on ${minute(batch.approvedAt)}` : ''}. The batch is now locked.`,
    },
    { kind: 'p', text: `Comment: ${batch.comment}` },
  ];
  if (batch.record)
    blocks.push({
      kind: 'list',
      items: [
        ...kLines(batch.record.best),
        `Approval record ${batch.record.id}, analysis engine ${batch.record.engineVersion}`,
      ],
    });
  blocks.push({ kind: 'link', label: 'Open the batch', url: batch.url });
  return compose(`Batch approved: ${batch.name}`, `Hello ${name},`, blocks);
}

export function invitationMail(name: string, link: string, validHours: number): MailContent {
  return compose('You have been invited to Equilight', `Hello ${name},`, [
    {
      kind: 'p',
      text: 'An administrator has created an Equilight account for you. Choose your password with the link below; it works once.',
    },
    { kind: 'link', label: 'Set your password', url: link },
    {
      kind: 'p',
      text: `The link expires in ${validHours} hours. If it has expired, ask an administrator for a new one.`,
    },
  ]);
}

export function passwordResetMail(name: string, link: string, validHours: number): MailContent {
  return compose('Reset your Equilight password', `Hello ${name},`, [
    {
      kind: 'p',
      text: 'Someone asked to reset the password of your Equilight account. If it was you, choose a new password with the link below; it works once.',
    },
    { kind: 'link', label: 'Choose a new password', url: link },
    {
      kind: 'p',
      text: `The link expires in ${validHours} hours. If you did not ask for this, ignore this mail: your password stays as it is.`,
    },
  ]);
}

export interface WatcherSilence {
  instrument: string;
  folder: string;
  watcherName: string;
  lastSeenAt: string;
  silentMinutes: number;
  url: string;
}

/** An active instrument's watcher stopped reporting: files dropped there may not reach the server. */
export function watcherSilentMail(name: string, s: WatcherSilence): MailContent {
  return compose(`Watcher silent: ${s.instrument}`, `Hello ${name},`, [
    {
      kind: 'p',
      text: `No watcher has reported for the drop folder of instrument "${s.instrument}" for more than ${s.silentMinutes} minutes. Files exported there may not be reaching Equilight.`,
    },
    {
      kind: 'list',
      items: [`Drop folder: ${s.folder}`, `Last report: ${minute(s.lastSeenAt)} by ${s.watcherName}`],
    },
    {
      kind: 'p',
      text: 'Check that the watcher process is running on the instrument computer and can reach the server. You get one more mail when it reports again.',
    },
    { kind: 'link', label: 'Open Instruments', url: s.url },
  ]);
}

/** The watcher of an instrument that was silent reports again. */
export function watcherBackMail(name: string, s: Omit<WatcherSilence, 'silentMinutes'>): MailContent {
  return compose(`Watcher back: ${s.instrument}`, `Hello ${name},`, [
    {
      kind: 'p',
      text: `The drop folder of instrument "${s.instrument}" is watched again (${s.watcherName} reported at ${minute(s.lastSeenAt)}).`,
    },
    { kind: 'list', items: [`Drop folder: ${s.folder}`] },
    { kind: 'link', label: 'Open Instruments', url: s.url },
  ]);
}
