/**
 * E-mail bodies. Every input is a plain value; each message is built once as a list of blocks
 * and rendered twice, as plain text and as simple HTML in which every value is escaped.
 */
import { PLAUSIBLE_BOUND_WORDS } from '../../shared/elicitation/bounds'
import { formatDateTime } from '../../shared/format'

export interface MailContent {
  subject: string
  text: string
  html: string
}

export interface DateStyle {
  /** IANA time zone of the round, chosen by the analyst: every time in the message is stated in it, with its name. */
  timeZone: string
}

export interface InvitationInput extends DateStyle {
  expertName: string
  studyTitle: string
  roundTitle: string
  opensAt: Date
  closesAt: Date
  /** Address of the app, e.g. https://priorsmith.example.org (no trailing slash needed). */
  publicUrl: string
  /** The invitation token; the link is `${publicUrl}/invite/${token}`. */
  token: string
  /** When the link stops working (14 days after sending). */
  linkExpiresAt: Date
  /** Names of the quantities the expert will be asked about. */
  quantities: string[]
  analystName?: string
  /** The analyst's briefing for the round, shown as given. */
  briefing?: string | null
}

export interface RoundNoticeInput extends DateStyle {
  expertName: string
  studyTitle: string
  roundTitle: string
  roundId: number
  opensAt: Date
  closesAt: Date
  publicUrl: string
  quantities: string[]
  analystName?: string
  briefing?: string | null
}

export interface ReminderInput extends DateStyle {
  expertName: string
  studyTitle: string
  roundTitle: string
  roundId: number
  closesAt: Date
  publicUrl: string
  /** Optional progress, e.g. 1 of 3 questions saved. */
  answered?: number
  total?: number
}

type Block =
  | { p: string }
  | { list: string[] }
  | { link: string; label: string }
  | { quote: string }

/** Escapes text for HTML element content and attribute values. */
export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)
}

/** Only http(s) links reach an href; anything else would be a way to smuggle script into the message. */
function safeUrl(url: string): string {
  let parsed: URL
  try {
    parsed = new URL(url)
  } catch {
    throw new Error(`mail template: not a valid link: ${JSON.stringify(url)}`)
  }
  if (parsed.protocol !== 'https:' && parsed.protocol !== 'http:') throw new Error(`mail template: links must use http or https: ${JSON.stringify(url)}`)
  return parsed.toString()
}

function appUrl(publicUrl: string, path: string): string {
  return safeUrl(publicUrl.replace(/\/+$/, '') + path)
}

/** Names and titles go into headers and single lines: no line breaks. */
const oneLine = (s: string) => s.replace(/\s+/g, ' ').trim()

/**
 * A moment in a message: "Thursday 24 December 2026, 18:00 (Europe/Berlin, UTC+1)", in the round's zone, named, with
 * its offset from UTC on that date (the shared document form of shared/format). A message must never say "Invalid Date".
 */
export function mailDateTime(d: Date, timeZone: string): string {
  if (!(d instanceof Date) || Number.isNaN(d.getTime())) throw new Error('mail template: invalid date')
  return formatDateTime(d, { timeZone, words: 'long', zone: true })
}

function render(subject: string, greeting: string, blocks: Block[], signOff: string[]): MailContent {
  const text: string[] = [greeting, '']
  const html: string[] = [`<p>${escapeHtml(greeting)}</p>`]
  for (const b of blocks) {
    if ('p' in b) {
      text.push(b.p, '')
      html.push(`<p>${escapeHtml(b.p)}</p>`)
    } else if ('list' in b) {
      text.push(...b.list.map((i) => `  - ${i}`), '')
      html.push(`<ul>${b.list.map((i) => `<li>${escapeHtml(i)}</li>`).join('')}</ul>`)
    } else if ('link' in b) {
      text.push(`${b.label}:`, b.link, '')
      html.push(`<p><a href="${escapeHtml(b.link)}">${escapeHtml(b.label)}</a><br><span style="color:#5b6b7a;font-size:90%">${escapeHtml(b.link)}</span></p>`)
    } else {
      text.push(...b.quote.split(/\r?\n/).map((l) => `> ${l}`), '')
      html.push(`<blockquote style="border-left:3px solid #1f6f5c;margin:0 0 1em;padding-left:1em">${escapeHtml(b.quote).replace(/\r?\n/g, '<br>')}</blockquote>`)
    }
  }
  text.push(...signOff)
  html.push(`<p>${signOff.map(escapeHtml).join('<br>')}</p>`)
  return {
    subject: oneLine(subject),
    text: text.join('\n').trimEnd() + '\n',
    html:
      '<!doctype html><html><body style="font-family:\'Open Sans\',Arial,sans-serif;color:#1d2733;line-height:1.5">' +
      html.join('\n') +
      '</body></html>',
  }
}

function signOff(analystName?: string): string[] {
  return analystName ? ['With thanks,', oneLine(analystName), 'sent through Priorsmith'] : ['With thanks,', 'the study team, through Priorsmith']
}

function questionsList(quantities: string[]): Block[] {
  const names = quantities.map(oneLine).filter(Boolean)
  if (!names.length) return []
  return [
    { p: `You will be asked for your judgement on ${names.length === 1 ? 'one quantity' : `${names.length} quantities`}:` },
    { list: names },
  ]
}

const WHAT_IS_ASKED =
  'For each quantity you give a few values and a short reason for them: for example the lowest and the highest value you find plausible ' +
  `(values you would be very surprised, ${PLAUSIBLE_BOUND_WORDS}, to see the true value fall beyond) and a middle value. ` +
  'As you answer you see a curve of what your values say, in plain words, and can adjust them. ' +
  'There are no right or wrong answers: we are asking for your honest, considered judgement, uncertainty included.'

/** What saving and submitting do: answers stay open to change until the expert submits them, and no longer. */
const SAVING_AND_SUBMITTING =
  'Your answers are saved as you go, and you can change them until you submit them. ' +
  'Submitting sends them to the analyst and freezes them; after that, only the analyst can reopen them.'

/** First contact with a new expert: a personal, single-use link that creates their account. */
export function invitationMessage(i: InvitationInput): MailContent {
  const tz = i.timeZone
  const name = oneLine(i.expertName)
  const link = appUrl(i.publicUrl, `/invite/${encodeURIComponent(i.token)}`)
  const blocks: Block[] = [
    { p: `You are invited to take part as an expert in the study "${oneLine(i.studyTitle)}", in the elicitation round "${oneLine(i.roundTitle)}".` },
    { p: `The round is open from ${mailDateTime(i.opensAt, tz)} until ${mailDateTime(i.closesAt, tz)}.` },
    ...questionsList(i.quantities),
    { p: WHAT_IS_ASKED },
    { p: SAVING_AND_SUBMITTING },
    ...(i.briefing?.trim() ? [{ p: 'The analyst\'s briefing for this round:' }, { quote: i.briefing.trim() }] : []),
    { link, label: 'Accept the invitation and set your password' },
    {
      p:
        `This link is personal: it creates your own account, so please do not forward it. ` +
        `It works once and expires on ${mailDateTime(i.linkExpiresAt, tz)}. ` +
        'If it has expired, or if you did not expect this invitation, contact the analyst who invited you, or simply ignore this message.',
    },
  ]
  return render(`Invitation: expert judgement for "${oneLine(i.studyTitle)}"`, `Dear ${name},`, blocks, signOff(i.analystName))
}

/** An expert who already has an account is on the panel of a new round. */
export function roundNoticeMessage(i: RoundNoticeInput): MailContent {
  const tz = i.timeZone
  const link = appUrl(i.publicUrl, `/answer/${encodeURIComponent(String(i.roundId))}`)
  const blocks: Block[] = [
    { p: `A new elicitation round, "${oneLine(i.roundTitle)}", is ready for you in the study "${oneLine(i.studyTitle)}".` },
    { p: `It is open from ${mailDateTime(i.opensAt, tz)} until ${mailDateTime(i.closesAt, tz)}.` },
    ...questionsList(i.quantities),
    ...(i.briefing?.trim() ? [{ p: 'The analyst\'s briefing for this round:' }, { quote: i.briefing.trim() }] : []),
    { link, label: 'Open the round (sign in with your Priorsmith account)' },
    { p: SAVING_AND_SUBMITTING },
  ]
  return render(`New round: "${oneLine(i.roundTitle)}" (${oneLine(i.studyTitle)})`, `Dear ${oneLine(i.expertName)},`, blocks, signOff())
}

/** A panel member has not submitted yet. */
export function reminderMessage(i: ReminderInput): MailContent {
  const tz = i.timeZone
  const link = appUrl(i.publicUrl, `/answer/${encodeURIComponent(String(i.roundId))}`)
  const progress =
    i.total !== undefined && i.total > 0 && i.answered !== undefined
      ? [{ p: `So far you have saved answers for ${i.answered} of ${i.total} ${i.total === 1 ? 'question' : 'questions'}.` }]
      : []
  const blocks: Block[] = [
    { p: `This is a reminder that the round "${oneLine(i.roundTitle)}" of the study "${oneLine(i.studyTitle)}" closes on ${mailDateTime(i.closesAt, tz)}, and we have not yet received your submission.` },
    ...progress,
    { link, label: 'Continue where you left off' },
    { p: 'If you have already submitted in the meantime, or cannot take part this time, please disregard this message or let the analyst know.' },
  ]
  return render(`Reminder: "${oneLine(i.roundTitle)}" closes ${mailDateTime(i.closesAt, tz)}`, `Dear ${oneLine(i.expertName)},`, blocks, signOff())
}

export interface RecordMailInput extends DateStyle {
  recipientName: string
  studyTitle: string
  studyId: number
  version: number
  /** Who submitted, returned or signed off. */
  actorName: string
  at: Date
  publicUrl: string
}

const recordLink = (i: RecordMailInput): Block => ({ link: appUrl(i.publicUrl, `/studies/${encodeURIComponent(String(i.studyId))}/record`), label: 'Open the prior record' })

/** A reviewer of the study: a record version waits for review. */
export function recordSubmittedMessage(i: RecordMailInput): MailContent {
  const blocks: Block[] = [
    { p: `${oneLine(i.actorName)} submitted version ${i.version} of the prior record of "${oneLine(i.studyTitle)}" for review on ${mailDateTime(i.at, i.timeZone)}.` },
    { p: 'Its content is frozen and identified by its SHA-256. As a reviewer of the study you can sign it off, or return it with comments for the analyst to answer.' },
    recordLink(i),
  ]
  return render(`Prior record to review: "${oneLine(i.studyTitle)}" (version ${i.version})`, `Dear ${oneLine(i.recipientName)},`, blocks, signOff())
}

/** An analyst of the study: a reviewer sent the record back with comments. */
export function recordReturnedMessage(i: RecordMailInput & { comment: string; section: string }): MailContent {
  const blocks: Block[] = [
    { p: `${oneLine(i.actorName)} returned version ${i.version} of the prior record of "${oneLine(i.studyTitle)}" on ${mailDateTime(i.at, i.timeZone)}, with this comment on "${oneLine(i.section)}":` },
    { quote: i.comment.trim() },
    { p: 'The record is a draft again. When you submit it again, you answer each comment: what you changed, or why nothing changed.' },
    recordLink(i),
  ]
  return render(`Prior record returned with comments: "${oneLine(i.studyTitle)}" (version ${i.version})`, `Dear ${oneLine(i.recipientName)},`, blocks, signOff())
}

/** An analyst of the study: a reviewer signed the record off. */
export function recordSignedOffMessage(i: RecordMailInput): MailContent {
  const blocks: Block[] = [
    { p: `${oneLine(i.actorName)} signed off version ${i.version} of the prior record of "${oneLine(i.studyTitle)}" on ${mailDateTime(i.at, i.timeZone)}.` },
    { p: 'This version can no longer change; any further change starts a new version.' },
    recordLink(i),
  ]
  return render(`Prior record signed off: "${oneLine(i.studyTitle)}" (version ${i.version})`, `Dear ${oneLine(i.recipientName)},`, blocks, signOff())
}
