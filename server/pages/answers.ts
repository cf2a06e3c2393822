import { CAUTION_NOTE, cautionLines } from '../../shared/cautions.ts';
import type { BookingFacts } from '../mail/facts.ts';
import { telHref } from '../../shared/phone.ts';
import { describeWindow } from '../../shared/slot-window.ts';
import { dateWords, localDateOf, localTimeOf } from '../../shared/local-dates.ts';
import { supplyLines } from '../../shared/slot-supply.ts';
import type { AnswerAction } from '../services/links.ts';
import type { LinkRefusal } from '../services/links.ts';
import { escapeHtml as e, page } from './page.ts';
import { ANSWER_REASON_MAX, DECLINE_REASON_CHOICES, REASON_LABEL } from '../../shared/schemas/answers.ts';

const ACTION_LABEL: Record<AnswerAction, { title: string; button: string }> = {
  confirm: { title: 'Confirm this slot', button: 'Confirm' },
  decline: { title: 'Decline this slot', button: 'Decline' },
  propose: { title: 'Propose another time', button: 'Send my proposal' },
};

/** A phone number the partner can tap to call (they open these pages on a phone). */
function phoneLink(phone: string): string {
  return `<a href="${e(telHref(phone))}">${e(phone)}</a>`;
}

/** "Role, name: phone" for each contact the read policy gives the partner (contactLines in the e-mail), phones tappable. */
function contactsHtml(contacts: BookingFacts['forPartner']['contacts']): string {
  return contacts
    .map((c) => `${e(c.role)}, ${e(c.name)}: ${c.phone ? phoneLink(c.phone) : 'no phone recorded'}`)
    .join('<br>');
}

/** "call Tideway Hot Tubs on 0113 …" with the number tappable, or without one when none is recorded. */
function callInstaller(f: BookingFacts): string {
  return `call ${e(f.installer.name)}${f.installer.phone ? ` on ${phoneLink(f.installer.phone)}` : ''}`;
}

/** The slot as the partner needs it on the day: the same facts as the e-mail, through the same read policy. */
export function slotDetails(f: BookingFacts): string {
  const when = describeWindow(f.booking.startsAt, f.booking.endsAt, f.installer.timeZone);
  const cautions = cautionLines(f.stage.kind);
  const lines = (xs: string[]) => xs.map((x) => e(x)).join('<br>');
  const unit = f.unit
    ? `<dt>Unit</dt><dd>${e(`${f.unit.model}, ${f.unit.lengthMm} × ${f.unit.widthMm} × ${f.unit.heightMm} mm, ${f.unit.dryWeightKg} kg dry`)}</dd>`
    : '';
  const supply = f.forPartner.supply
    ? `<dt>Electrical supply</dt><dd>${lines(supplyLines(f.forPartner.supply))}</dd>`
    : '';
  return `<dl>
<dt>Work</dt><dd>${e(f.stage.name)} for ${e(f.installer.name)} (job ${e(f.job.reference)})</dd>
<dt>Booked</dt><dd>${e(f.resource.name)}</dd>${unit}${f.forPartner.facing ? `<dt>Which way it faces</dt><dd>${e(f.forPartner.facing)}</dd>` : ''}${supply}
<dt>When</dt><dd>${e(when.date)}<br>${e(when.window)} (${e(when.zone)})</dd>
<dt>Site</dt><dd>${e(f.job.siteAddress)}, ${e(f.job.siteTown)} ${e(f.job.sitePostcode)}</dd>
<dt>Access and parking</dt><dd>${e(f.job.accessNotes ?? 'Ask the installer before you travel.')}</dd>
<dt>On the day, call</dt><dd>${contactsHtml(f.forPartner.contacts)}</dd>
</dl>${cautions.length ? `<div class="caution"><strong>Safety on this job</strong><ul>${cautions.map((c) => `<li>${e(c)}</li>`).join('')}</ul><strong>${e(CAUTION_NOTE)}</strong></div>` : ''}`;
}

/** Local date and times of the slot, to pre-fill the proposal form. */
function localParts(d: Date, timeZone: string): { date: string; time: string } {
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-GB', {
      timeZone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
    })
      .formatToParts(d)
      .map((p) => [p.type, p.value]),
  );
  return { date: `${parts.year}-${parts.month}-${parts.day}`, time: `${parts.hour}:${parts.minute}` };
}

/**
 * Why the partner declines or proposes another time: quick choices (decline only) and their own
 * words, both optional. The label says who reads it.
 */
function reasonFields(action: AnswerAction): string {
  const own = (label: string) =>
    `<label for="reason">${e(label)}</label><input id="reason" name="reason" type="text" maxlength="${ANSWER_REASON_MAX}" autocomplete="off">`;
  if (action !== 'decline') return own(REASON_LABEL);
  const choices = DECLINE_REASON_CHOICES.map(
    (c, i) =>
      `<label for="choice-${i}" style="font-weight:normal"><input type="radio" name="choice" id="choice-${i}" value="${e(c)}" style="width:auto;margin-right:.5rem">${e(c)}</label>`,
  );
  return `<fieldset style="border:1px solid #c8d3dc;border-radius:6px;margin-top:1rem"><legend style="font-weight:bold">${e(REASON_LABEL)}</legend>
${choices.join('\n')}
${own('In your own words')}
</fieldset>`;
}

/** GET /answer/:token: shows the slot and one button. Nothing changes until the form is sent. */
export function answerForm(f: BookingFacts, action: AnswerAction, formAction: string, error?: string): string {
  const label = ACTION_LABEL[action];
  const start = localParts(f.booking.startsAt, f.installer.timeZone);
  const end = localParts(f.booking.endsAt, f.installer.timeZone);
  const fields =
    action === 'propose'
      ? `
<p>Times are in ${e(f.installer.timeZone)}, the installer's time zone.</p>
<label for="date">Date</label><input id="date" name="date" type="date" required value="${e(start.date)}">
<label for="start">From</label><input id="start" name="start" type="time" required value="${e(start.time)}">
<label for="endDate">Until (date)</label><input id="endDate" name="endDate" type="date" value="${e(end.date)}">
<label for="end">Until (time)</label><input id="end" name="end" type="time" required value="${e(end.time)}">${reasonFields(action)}`
      : action === 'decline'
        ? reasonFields(action)
        : '';
  return page(
    label.title,
    `${error ? `<p role="alert"><strong>${e(error)}</strong></p>` : ''}${slotDetails(f)}
<form method="post" action="${e(formAction)}">${fields}<button type="submit">${e(label.button)}</button></form>`,
  );
}

/** `after`: a section below the slot (the certificate link, once an electrical connection is confirmed). */
export function answeredPage(f: BookingFacts, result: 'confirmed' | 'declined' | 'proposed', after = ''): string {
  const text = {
    confirmed: ['Thank you: the slot is confirmed', `${f.installer.name} can see your confirmation now.`],
    declined: [
      'Thank you: the slot is declined',
      `${f.installer.name} can see your answer now and will find another slot.`,
    ],
    proposed: [
      'Thank you: your proposal is sent',
      `${f.installer.name} will accept it or keep the original time; you will get an e-mail either way.`,
    ],
  }[result];
  return page(text[0]!, `<p>${e(text[1])}</p>${slotDetails(f)}${after}`, 'ok');
}

export function stalePage(f: BookingFacts): string {
  return page(
    'This slot has changed',
    `<p>${e(f.installer.name)} changed this booking after the e-mail you used was sent, so its links no longer work.
A newer e-mail has been sent to you; here is the slot as it is now:</p>${slotDetails(f)}`,
    'warn',
  );
}

/** An invitation's own words where a booking's would mislead. */
const INVITE_REFUSALS = {
  used: [
    'This invitation was already accepted',
    'Each invitation link works once. Sign in with Google using the e-mail address it was sent to.',
  ],
  gone: [
    'This invitation no longer exists',
    'The firm withdrew it or sent a newer one. Ask the person who invited you for a new invitation.',
  ],
  expired: [
    'This invitation has expired',
    'Invitation links work for a limited time. Ask the person who invited you to send a new one.',
  ],
} as const;

/** A certificate link's: it is no request, and the certificate can still go from Our slots. */
const CERTIFICATE_REFUSALS = {
  expired: [
    'This link has expired',
    'Certificate links work for a while after the job. Sign in to Waterline and upload it from Our slots, or ask the installer for a new link.',
  ],
} as const;

/** How an answer reads after "It was": what the partner did with the request. */
const ANSWERED_AS: Record<AnswerAction, string> = {
  confirm: 'confirmed',
  decline: 'declined',
  propose: 'answered with another time proposed',
};

/**
 * A link of a request already answered (each request's links work once), opened again: when and
 * how it was answered, where the booking stands now and the slot as it is now, so the e-mail still
 * leads to the site, the times and whom to call on the day. `after`: as for {@link closedPage}.
 */
export function usedPage(f: BookingFacts, answer: { action: AnswerAction; at: Date }, after = ''): string {
  const zone = f.installer.timeZone;
  const when = `${dateWords(localDateOf(answer.at, zone))} at ${localTimeOf(answer.at, zone)}`;
  return page(
    'This request was already answered',
    `<p>It was ${e(ANSWERED_AS[answer.action])} on ${e(when)}, and the links in its e-mail work once. This booking is now ${e(stateWords(f))}. To change anything, ${callInstaller(f)}.</p>${slotDetails(f)}${after}`,
    'warn',
  );
}

/** Where a booking stands, as a partner reads it. */
function stateWords(f: BookingFacts): string {
  return (
    {
      confirmed: 'confirmed',
      declined: 'declined',
      pencilled: 'withdrawn by the installer',
      on_site: 'under way',
      done: 'done',
      sent: 'waiting for an answer',
    }[f.booking.state] ?? f.booking.state
  );
}

export function closedPage(f: BookingFacts, after = ''): string {
  return page(
    'Already answered',
    `<p>This booking is ${e(stateWords(f))}, so there is nothing to answer. To change anything, ${callInstaller(f)}.</p>${slotDetails(f)}${after}`,
    'warn',
  );
}

export function takenPage(f: BookingFacts): string {
  return page(
    'That time was taken meanwhile',
    `<p>${e(f.resource.name)} was confirmed for another job that overlaps this slot, so this one cannot be confirmed.
Please decline it or propose another time from the e-mail, or ${callInstaller(f)}.</p>${slotDetails(f)}`,
    'refused',
  );
}

/**
 * The page for a link refused. `subject`: what the link was for, so a used, expired or withdrawn
 * invitation is not spoken of as a booking.
 */
export function refusalPage(
  reason: LinkRefusal | 'used' | 'gone',
  subject: 'answer' | 'invite' | 'certificate' = 'answer',
): string {
  const own: Partial<Record<typeof reason, readonly [string, string]>> =
    subject === 'invite' ? INVITE_REFUSALS : subject === 'certificate' ? CERTIFICATE_REFUSALS : {};
  const words = own[reason];
  if (words) return page(words[0], `<p>${e(words[1])}</p>`, 'refused');
  const text: Record<typeof reason, [string, string]> = {
    tampered: [
      'This link is not valid',
      'The link is incomplete or has been altered. Open it again from the e-mail, or copy the whole address.',
    ],
    expired: [
      'This link has expired',
      'The slot this link was for is over or the link is too old. Ask the installer for a new request.',
    ],
    'wrong-purpose': [
      'This link is not valid here',
      'The link was made for something else. Open it again from the e-mail.',
    ],
    used: [
      'This link has already been used',
      'Each link in an e-mail works once. Your earlier answer stands; call the installer to change it.',
    ],
    gone: ['This booking no longer exists', 'The installer has removed this booking. Nothing more is needed from you.'],
  };
  return page(text[reason][0], `<p>${e(text[reason][1])}</p>`, 'refused');
}
