import {
  EXCEPTION_KIND_LABELS,
  FINDING_CAUSE_LABELS,
  type ExceptionKind,
  type ExceptionScope,
  type FindingCause,
  likelyChecks,
  measuredWords,
} from '@tierscope/domain';
import type { OutgoingMail } from '../../platform/mailer';

/**
 * The words of every mail Tierscope sends: plain text and HTML, the product and the farm in the subject,
 * and a link to the exact page. Pure functions of their inputs, so the wording is tested without SMTP.
 */

export function spotWords(scope: ExceptionScope, row: number | null, tier: number | null): string {
  if (scope === 'section') return `row ${row ?? '?'}, tier ${tier ?? '?'}`;
  if (scope === 'row') return `row ${row ?? '?'} (all tiers)`;
  if (scope === 'tier') return `tier ${tier ?? '?'} (all rows)`;
  return 'whole house';
}

export function escapeHtml(text: string): string {
  return text
    .replaceAll('&', '&amp;')
    .replaceAll('<', '&lt;')
    .replaceAll('>', '&gt;')
    .replaceAll('"', '&quot;')
    .replaceAll("'", '&#39;');
}

function page(title: string, paragraphs: string[], link: { href: string; label: string }): string {
  return [
    '<!doctype html><html><body style="font-family: sans-serif; color: #1c2b2d; line-height: 1.45">',
    `<h2 style="color: #22565a; margin: 0 0 12px">${escapeHtml(title)}</h2>`,
    ...paragraphs.map((p) => `<p>${p}</p>`),
    `<p><a href="${escapeHtml(link.href)}" style="color: #22565a; font-weight: 600">${escapeHtml(link.label)}</a></p>`,
    '<p style="color: #5b6b6d; font-size: 12px">Sent by Tierscope. Change which mails you get under Notifications.</p>',
    '</body></html>',
  ].join('\n');
}

export interface ExceptionForMail {
  id: number;
  kind: ExceptionKind;
  scope: ExceptionScope;
  row: number | null;
  tier: number | null;
  ratio: number;
  eggs: number;
  expected: number;
  /** how unusual (a one-sided tail probability), put in words */
  pValue: number;
  openedAt: Date;
}

export function newExceptionsMail(input: {
  to: string[];
  publicUrl: string;
  farmName: string;
  houseId: number;
  houseName: string;
  timezone: string;
  exceptions: ExceptionForMail[];
}): OutgoingMail {
  const { exceptions } = input;
  const count = exceptions.length;
  const subject = `[Tierscope · ${input.farmName}] ${count === 1 ? 'New exception' : `${count} new exceptions`} in ${input.houseName}`;
  const when = (d: Date) =>
    d.toLocaleString('en-GB', {
      timeZone: input.timezone,
      day: 'numeric',
      month: 'short',
      hour: '2-digit',
      minute: '2-digit',
    });
  const line = (e: ExceptionForMail) =>
    `${EXCEPTION_KIND_LABELS[e.kind]} at ${spotWords(e.scope, e.row, e.tier)}: ${measuredWords(e)}, since ${when(e.openedAt)} (${input.timezone})`;
  const link = `${input.publicUrl}/exceptions?houseId=${input.houseId}`;
  const checks = (e: ExceptionForMail) => likelyChecks(e.kind, e.scope).join('; ');
  const text = [
    `${input.houseName}, ${input.farmName}: Tierscope flagged ${count === 1 ? 'a spot' : `${count} spots`} laying clearly less than expected.`,
    '',
    ...exceptions.flatMap((e) => [`- ${line(e)}`, `  Likely checks: ${checks(e)}`]),
    '',
    `Open the exceptions of ${input.houseName}: ${link}`,
  ].join('\n');
  const html = page(
    `${input.houseName}, ${input.farmName}`,
    [
      `Tierscope flagged ${count === 1 ? 'a spot' : `${count} spots`} laying clearly less than expected.`,
      `<ul>${exceptions
        .map(
          (e) =>
            `<li>${escapeHtml(line(e))}<br><small>Likely checks: ${escapeHtml(checks(e))}</small></li>`,
        )
        .join('')}</ul>`,
    ],
    { href: link, label: `Open the exceptions of ${input.houseName}` },
  );
  return { to: input.to, subject, text, html };
}

export interface WorkOrderForMail {
  id: number;
  title: string;
  farmName: string;
  houseName: string;
  row: number | null;
  tier: number | null;
  priority: string;
  dueOn: string | null;
}

function orderSpot(o: WorkOrderForMail): string {
  if (o.row !== null && o.tier !== null) return `row ${o.row}, tier ${o.tier}`;
  if (o.row !== null) return `row ${o.row}`;
  if (o.tier !== null) return `tier ${o.tier}`;
  return 'whole house';
}

export function workOrderAssignedMail(input: {
  to: string[];
  publicUrl: string;
  order: WorkOrderForMail;
  assignedBy: string;
}): OutgoingMail {
  const o = input.order;
  const link = `${input.publicUrl}/work-orders/${o.id}`;
  const where = `${o.houseName}, ${orderSpot(o)}`;
  const due = o.dueOn ? `Due ${o.dueOn}.` : 'No due date.';
  return {
    to: input.to,
    subject: `[Tierscope · ${o.farmName}] Work order #${o.id} for you: ${o.title}`,
    text: [
      `${input.assignedBy} assigned you work order #${o.id}: ${o.title}`,
      `Where: ${where}. Priority: ${o.priority}. ${due}`,
      '',
      'Lock out and tag out before touching belts, augers or drives; use the service cart on upper tiers.',
      "Local codes and your site's own procedures come first.",
      '',
      `Open it: ${link}`,
    ].join('\n'),
    html: page(
      `Work order #${o.id}: ${o.title}`,
      [
        `${escapeHtml(input.assignedBy)} assigned you this work order.`,
        `Where: <strong>${escapeHtml(where)}</strong>. Priority: ${escapeHtml(o.priority)}. ${escapeHtml(due)}`,
        'Lock out and tag out before touching belts, augers or drives; use the service cart on upper tiers. ' +
          "Local codes and your site's own procedures come first.",
      ],
      { href: link, label: 'Open the work order' },
    ),
  };
}

export function workOrderDoneMail(input: {
  to: string[];
  publicUrl: string;
  order: WorkOrderForMail;
  doneBy: string;
  cause: FindingCause | null;
  notes: string;
}): OutgoingMail {
  const o = input.order;
  const link = `${input.publicUrl}/work-orders/${o.id}`;
  const found = `${input.cause ? FINDING_CAUSE_LABELS[input.cause] : 'No cause given'}${input.notes ? `: ${input.notes}` : ''}`;
  return {
    to: input.to,
    subject: `[Tierscope · ${o.farmName}] Work order #${o.id} done: ${o.title}`,
    text: [
      `${input.doneBy} marked work order #${o.id} done (${o.houseName}, ${orderSpot(o)}).`,
      `Found: ${found}`,
      '',
      `Open it: ${link}`,
    ].join('\n'),
    html: page(
      `Work order #${o.id} done`,
      [
        `${escapeHtml(input.doneBy)} marked <strong>${escapeHtml(o.title)}</strong> done (${escapeHtml(`${o.houseName}, ${orderSpot(o)}`)}).`,
        `Found: ${escapeHtml(found)}`,
      ],
      { href: link, label: 'Open the work order' },
    ),
  };
}

export function invitationMail(input: {
  to: string;
  name: string;
  publicUrl: string;
  token: string;
  invitedBy: string;
  farmNames: string[];
  expiresHours: number;
}): OutgoingMail {
  const link = `${input.publicUrl}/set-password?token=${encodeURIComponent(input.token)}`;
  const farms = input.farmNames.join(', ');
  return {
    to: [input.to],
    subject: `[Tierscope · ${farms}] You are invited to Tierscope`,
    text: [
      `Hello ${input.name},`,
      '',
      `${input.invitedBy} added you to Tierscope for ${farms}.`,
      `Choose your password here (the link works once, for ${input.expiresHours} hours):`,
      link,
    ].join('\n'),
    html: page(
      'You are invited to Tierscope',
      [
        `Hello ${escapeHtml(input.name)},`,
        `${escapeHtml(input.invitedBy)} added you to Tierscope for ${escapeHtml(farms)}.`,
        `The link works once, for ${input.expiresHours} hours.`,
      ],
      { href: link, label: 'Choose your password' },
    ),
  };
}

export function passwordResetMail(input: {
  to: string;
  name: string;
  publicUrl: string;
  token: string;
  expiresMinutes: number;
}): OutgoingMail {
  const link = `${input.publicUrl}/set-password?token=${encodeURIComponent(input.token)}`;
  return {
    to: [input.to],
    subject: '[Tierscope] Reset your password',
    text: [
      `Hello ${input.name},`,
      '',
      'Someone asked to reset your Tierscope password. If it was you, choose a new one here',
      `(the link works once, for ${input.expiresMinutes} minutes):`,
      link,
      '',
      'If it was not you, ignore this mail: your password stays as it is.',
    ].join('\n'),
    html: page(
      'Reset your password',
      [
        `Hello ${escapeHtml(input.name)},`,
        `Someone asked to reset your Tierscope password. The link works once, for ${input.expiresMinutes} minutes.`,
        'If it was not you, ignore this mail: your password stays as it is.',
      ],
      { href: link, label: 'Choose a new password' },
    ),
  };
}
