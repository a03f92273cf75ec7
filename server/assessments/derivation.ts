/**
 * The best overall response derived from a patient's timepoint assessments, under RECIST 1.1
 * (Eisenhauer et al. 2009, Eur J Cancer 45:228–247) as the protocol configures it:
 * - with confirmation required, a CR is confirmed by a later CR, and a PR by a later PR or CR, at
 *   least `confirmationMinDays` on, with nothing in between that breaks the response (SD, or a
 *   weaker response; NE only when the protocol says NE breaks confirmation);
 * - a CR followed by PR is read as PR; an unconfirmed response counts as SD when it was at least
 *   `sdMinDays` after enrolment, otherwise it leaves the best response at PD (progression followed)
 *   or NE;
 * - SD needs an assessment of SD or better at least `sdMinDays` after enrolment;
 * - assessments dated before enrolment are left out and flagged; those after the first PD do not
 *   count;
 * - responder status stays pending (null) while a response awaits confirmation, or while the best
 *   response is NE without progression (a later assessment may still settle it).
 * Pure: dates in, a readable derivation out, so the server, the import and the tests share it.
 */
import { addDays, differenceInCalendarDays, format, parseISO } from 'date-fns';
import { plural, responderWords } from '../words/index.js';

export const RESPONSES = ['CR', 'PR', 'SD', 'PD', 'NE'] as const;
export type TimepointResponse = (typeof RESPONSES)[number];
export type Outcome = 'pending' | 'responder' | 'non_responder';

export type DerivationSettings = {
  confirmationRequired: boolean;
  confirmationMinDays: number;
  sdMinDays: number;
  neBetweenResponses: 'ignore' | 'breaks_confirmation';
  assessmentIntervalDays: number;
};

export type AssessmentInput = { id?: string; date: string; response: TimepointResponse };

export type StepRole =
  | 'made-response'
  | 'confirmed'
  | 'supporting'
  | 'unconfirmed'
  | 'awaiting-confirmation'
  | 'stable'
  | 'too-early-for-sd'
  | 'progression'
  | 'not-evaluable'
  | 'ignored'
  | 'before-enrolment';

export type DerivationStep = { assessmentId?: string; date: string; response: TimepointResponse; role: StepRole; note: string };

export type AttentionKind =
  | 'unconfirmed-past-window'
  | 'sd-before-minimum'
  | 'assessment-before-enrolment'
  | 'gap-longer-than-schedule'
  | 'entered-disagrees';

export type AttentionItem = { kind: AttentionKind; message: string; date?: string; assessmentId?: string };

/** A CR or PR whose confirming assessment may still come. */
export type PendingConfirmation = {
  assessmentId?: string;
  date: string;
  response: 'CR' | 'PR';
  /** The level the confirming assessment would establish. */
  level: 'CR' | 'PR';
  earliestConfirmation: string;
  /** The next scheduled assessment should have confirmed it by this date. */
  dueBy: string;
  /** True when the best overall response is already a confirmed PR and this CR could raise it. */
  upgrade: boolean;
};

export type EnteredOutcome = { outcome: Outcome; bestOverallResponse: TimepointResponse | null };

export type DerivationInput = {
  enrolledOn: string;
  assessments: AssessmentInput[];
  settings: DerivationSettings;
  today?: string;
  /** The directly entered outcome, when the protocol keeps entered outcomes; compared, never changed. */
  entered?: EnteredOutcome;
};

export type Derivation = {
  bestOverallResponse: TimepointResponse | null;
  /** null while nothing is settled yet: no assessment, a response awaiting confirmation, or NE without progression. */
  responder: boolean | null;
  confirmed: boolean;
  /** The assessment date the best overall response rests on. */
  basisDate: string | null;
  steps: DerivationStep[];
  explanation: string[];
  needed: string[];
  attention: AttentionItem[];
  pendingConfirmation: PendingConfirmation[];
  enrolledOn: string;
  settings: DerivationSettings;
  derivedOn: string;
};

/**
 * Date parsing and formatting cost tens of microseconds each and a trial-wide recompute makes
 * hundreds of thousands of calls over a few hundred distinct dates, so results are remembered.
 */
function remembered<T>(compute: (key: string) => T): (key: string) => T {
  const cache = new Map<string, T>();
  return (key) => {
    let value = cache.get(key);
    if (value === undefined) {
      if (cache.size > 20_000) cache.clear();
      value = compute(key);
      cache.set(key, value);
    }
    return value;
  };
}

const EPOCH = parseISO('2000-01-01');
const dayNumber = remembered((iso) => differenceInCalendarDays(parseISO(iso), EPOCH));

/** '2026-03-03' → '3 March 2026', the way the explanation reads. */
export const longDate = remembered((iso) => format(parseISO(iso), 'd MMMM yyyy'));

const shifted = remembered((key) => {
  const [iso, days] = key.split('|');
  return format(addDays(parseISO(iso), Number(days)), 'yyyy-MM-dd');
});
const plusDays = (iso: string, days: number) => shifted(`${iso}|${days}`);
const daysBetween = (from: string, to: string) => dayNumber(to) - dayNumber(from);

type Timepoint = AssessmentInput & { order: number };
type Level = 'CR' | 'PR';

/** Whether a timepoint response keeps a response of this level going. */
const holds = (level: Level, response: TimepointResponse) => (level === 'CR' ? response === 'CR' : response === 'CR' || response === 'PR');

type ConfirmationStatus =
  | { kind: 'confirmed'; by: Timepoint; level: Level }
  | { kind: 'broken'; by: Timepoint; level: Level }
  | { kind: 'open'; level: Level };

/**
 * Follows the response at `start` through the later assessments: confirmed by the first one of the
 * same level at least the minimum interval later, broken by anything weaker in between.
 */
function follow(points: Timepoint[], start: number, level: Level, settings: DerivationSettings): ConfirmationStatus {
  const from = points[start];
  for (let k = start + 1; k < points.length; k += 1) {
    const next = points[k];
    if (next.response === 'NE') {
      if (settings.neBetweenResponses === 'breaks_confirmation') return { kind: 'broken', by: next, level };
      continue;
    }
    if (!holds(level, next.response)) return { kind: 'broken', by: next, level };
    if (daysBetween(from.date, next.date) >= settings.confirmationMinDays) return { kind: 'confirmed', by: next, level };
  }
  return { kind: 'open', level };
}

/** A CR is followed as CR first; when that fails it may still be confirmed as PR. */
function statusOf(points: Timepoint[], index: number, settings: DerivationSettings): ConfirmationStatus {
  if (points[index].response === 'CR') {
    const asCr = follow(points, index, 'CR', settings);
    if (asCr.kind !== 'broken') return asCr;
    const asPr = follow(points, index, 'PR', settings);
    return asPr.kind === 'broken' ? asCr : asPr;
  }
  return follow(points, index, 'PR', settings);
}

function firstConfirmed(points: Timepoint[], level: Level, settings: DerivationSettings): { start: Timepoint; by: Timepoint } | undefined {
  for (let i = 0; i < points.length; i += 1) {
    if (!holds(level, points[i].response)) continue;
    const status = follow(points, i, level, settings);
    if (status.kind === 'confirmed') return { start: points[i], by: status.by };
  }
  return undefined;
}

function brokenReason(status: Extract<ConfirmationStatus, { kind: 'broken' }>): string {
  const { by } = status;
  if (by.response === 'NE') return `the NE on ${longDate(by.date)} came first, and under this protocol NE breaks confirmation`;
  if (by.response === 'PD') return `progression followed on ${longDate(by.date)}`;
  return `the response did not hold: the assessment on ${longDate(by.date)} was ${by.response}`;
}

function pendingOf(point: Timepoint, level: Level, settings: DerivationSettings, upgrade: boolean): PendingConfirmation {
  return {
    assessmentId: point.id,
    date: point.date,
    response: point.response as Level,
    level,
    earliestConfirmation: plusDays(point.date, settings.confirmationMinDays),
    dueBy: plusDays(point.date, Math.max(settings.confirmationMinDays, settings.assessmentIntervalDays)),
    upgrade,
  };
}

function neededSentence(pending: PendingConfirmation): string {
  const base = `${pending.response} on ${longDate(pending.date)} needs a confirming assessment on or after ${longDate(pending.earliestConfirmation)}`;
  if (pending.upgrade) return `${base} (a CR then would raise the best overall response to a confirmed CR).`;
  if (pending.response === 'CR' && pending.level === 'CR') return `${base} (a CR confirms CR; a PR would confirm PR).`;
  return `${base}.`;
}

/** True when both outcomes are known and differ in best overall response or responder status. */
export function disagreesWithDerivation(
  entered: EnteredOutcome,
  derived: { bestOverallResponse: TimepointResponse | null; responder: boolean | null },
): boolean {
  if (entered.outcome === 'pending' || derived.responder === null || derived.bestOverallResponse === null) return false;
  if ((entered.outcome === 'responder') !== derived.responder) return true;
  return entered.bestOverallResponse !== null && entered.bestOverallResponse !== derived.bestOverallResponse;
}

/** The assessments in date order (same-day ones in the order given), around enrolment and the first progression. */
type Timeline = {
  all: Timepoint[];
  /** Dated before enrolment: left out. */
  early: Timepoint[];
  /** On or after enrolment, up to and including the first PD: what the best overall response is read from. */
  points: Timepoint[];
  /** After the first PD: they do not count. */
  afterPd: Timepoint[];
  progression: Timepoint | undefined;
};

/** The protocol's rules as one derivation applies them. */
type Rules = {
  settings: DerivationSettings;
  enrolledOn: string;
  today: string;
  /** The first day an assessment of SD or better counts as stable disease. */
  sdFrom: string;
};

/** What the best overall response rests on. */
type Best = {
  best: TimepointResponse | null;
  basis: Timepoint | undefined;
  confirmed: boolean;
  /** The confirmed response and the assessment that confirmed it. */
  pair: { start: Timepoint; by: Timepoint } | undefined;
  /** Responses whose confirmation may still come. */
  pending: PendingConfirmation[];
};

type Status = {
  responder: boolean | null;
  /** Pending confirmations that hold up the responder status (not mere upgrades of a confirmed PR). */
  awaiting: PendingConfirmation[];
  /** NE without progression is not settled: the next assessment may still establish SD or better. */
  unsettledNe: boolean;
};

function timelineOf(input: DerivationInput): Timeline {
  const all: Timepoint[] = input.assessments
    .map((a, order) => ({ ...a, order }))
    .sort((a, b) => (a.date === b.date ? a.order - b.order : a.date < b.date ? -1 : 1));
  const onStudy = all.filter((p) => p.date >= input.enrolledOn);
  const pdAt = onStudy.findIndex((p) => p.response === 'PD');
  return {
    all,
    early: all.filter((p) => p.date < input.enrolledOn),
    points: pdAt < 0 ? onStudy : onStudy.slice(0, pdAt + 1),
    afterPd: pdAt < 0 ? [] : onStudy.slice(pdAt + 1),
    progression: pdAt < 0 ? undefined : onStudy[pdAt],
  };
}

/** With confirmation required: the first confirmed CR, else the first confirmed PR, and the responses still awaiting confirmation. */
function confirmedResponse(points: Timepoint[], settings: DerivationSettings): Best {
  let best: TimepointResponse | null = null;
  let pair = firstConfirmed(points, 'CR', settings);
  if (pair) best = 'CR';
  else {
    pair = firstConfirmed(points, 'PR', settings);
    if (pair) best = 'PR';
  }
  const pending: PendingConfirmation[] = [];
  for (let i = 0; i < points.length; i += 1) {
    const point = points[i];
    if (point.response !== 'CR' && point.response !== 'PR') continue;
    const status = statusOf(points, i, settings);
    if (status.kind !== 'open' || pending.some((p) => p.level === status.level)) continue;
    if (best === 'CR' || (best === 'PR' && status.level === 'PR')) continue;
    pending.push(pendingOf(point, status.level, settings, best === 'PR'));
  }
  return { best, basis: pair?.start, confirmed: !!pair, pair, pending };
}

/** Without confirmation: the first CR, else the first PR. */
function bestTimepointResponse(points: Timepoint[]): Best {
  const basis = points.find((p) => p.response === 'CR') ?? points.find((p) => p.response === 'PR');
  return { best: basis ? basis.response : null, basis, confirmed: false, pair: undefined, pending: [] };
}

/** Without a response: SD once an assessment of SD or better reaches the minimum, else PD when progression came, else NE. */
function withoutResponse(timeline: Timeline, sdFrom: string): Pick<Best, 'best' | 'basis'> {
  const { points, progression } = timeline;
  const stable = points.find((p) => p.response !== 'PD' && p.response !== 'NE' && p.date >= sdFrom);
  if (stable) return { best: 'SD', basis: stable };
  if (progression) return { best: 'PD', basis: progression };
  if (points.length > 0) return { best: 'NE', basis: points[points.length - 1] };
  return { best: null, basis: undefined };
}

function bestOverall(timeline: Timeline, rules: Rules): Best {
  const found = rules.settings.confirmationRequired ? confirmedResponse(timeline.points, rules.settings) : bestTimepointResponse(timeline.points);
  return found.best ? found : { ...found, ...withoutResponse(timeline, rules.sdFrom) };
}

function statusOfBest(found: Best, timeline: Timeline, settings: DerivationSettings): Status {
  const { best, confirmed } = found;
  const awaiting = found.pending.filter((p) => !p.upgrade);
  const unsettledNe = best === 'NE' && !timeline.progression;
  const responder: boolean | null =
    best === null || unsettledNe ? null : confirmed || (!settings.confirmationRequired && (best === 'CR' || best === 'PR')) ? true : awaiting.length > 0 ? null : false;
  return { responder, awaiting, unsettledNe };
}

/** Each assessment's part in the derivation, in a sentence. */
function stepsOf(timeline: Timeline, found: Best, rules: Rules): Map<Timepoint, DerivationStep> {
  const { settings, enrolledOn, sdFrom } = rules;
  const { points, progression } = timeline;
  const { best, basis, confirmed, pair, pending } = found;
  const steps = new Map<Timepoint, DerivationStep>();
  const step = (point: Timepoint, role: StepRole, note: string) =>
    steps.set(point, { assessmentId: point.id, date: point.date, response: point.response, role, note });
  for (const point of timeline.early) step(point, 'before-enrolment', `Dated before enrolment on ${longDate(enrolledOn)}: left out of the derivation.`);
  for (let i = 0; i < points.length; i += 1) {
    const point = points[i];
    const daysIn = daysBetween(enrolledOn, point.date);
    if (point.response === 'PD') {
      step(point, 'progression', `Progression ${daysIn} days after enrolment: later assessments do not count towards the best overall response.`);
    } else if (point.response === 'NE') {
      step(
        point,
        'not-evaluable',
        settings.neBetweenResponses === 'ignore'
          ? 'Not evaluable: under this protocol it neither confirms nor breaks a response.'
          : 'Not evaluable: under this protocol it breaks the confirmation of an earlier response.',
      );
    } else if (point.response === 'SD') {
      if (point.date >= sdFrom) step(point, 'stable', `Stable disease ${daysIn} days after enrolment (the minimum is ${settings.sdMinDays} days).`);
      else step(point, 'too-early-for-sd', `Stable disease only ${daysIn} days after enrolment; it counts from ${longDate(sdFrom)} (${settings.sdMinDays} days).`);
    } else if (!settings.confirmationRequired) {
      step(point, point === basis ? 'made-response' : 'supporting', point === basis ? `The best timepoint response, ${daysIn} days after enrolment.` : `${point.response}, ${daysIn} days after enrolment.`);
    } else if (pair && point === pair.start) {
      const gap = daysBetween(point.date, pair.by.date);
      const reread = point.response === 'CR' && best === 'PR' ? ' It is read as PR: the response that followed was not a CR (RECIST 1.1).' : '';
      step(point, 'made-response', `The response the best overall response rests on, confirmed ${gap} days later on ${longDate(pair.by.date)}.${reread}`);
    } else if (pair && point === pair.by) {
      step(point, 'confirmed', `Confirms the ${best} of ${longDate(pair.start.date)}, ${daysBetween(pair.start.date, point.date)} days later (at least ${settings.confirmationMinDays} required).`);
    } else {
      const status = statusOf(points, i, settings);
      const open = pending.find((p) => p.date === point.date);
      if (open) step(point, 'awaiting-confirmation', `Awaits a confirming assessment on or after ${longDate(open.earliestConfirmation)}.`);
      else if (confirmed) step(point, 'supporting', `${point.response}; the confirmed ${best} above stands.`);
      else if (status.kind !== 'broken') step(point, 'supporting', `${point.response}; an earlier response already awaits confirmation.`);
      else {
        const asSd = point.date >= sdFrom ? 'it counts as stable disease' : `it was too early (before ${longDate(sdFrom)}) to count as stable disease`;
        step(point, 'unconfirmed', `Not confirmed: ${brokenReason(status)}; ${asSd}.`);
      }
    }
  }
  for (const point of timeline.afterPd) step(point, 'ignored', `After progression on ${longDate((progression as Timepoint).date)}: does not change the best overall response.`);
  return steps;
}

function protocolSentence({ settings, enrolledOn, sdFrom }: Rules): string {
  return settings.confirmationRequired
    ? `The protocol requires a CR or PR to be confirmed by a later assessment at least ${settings.confirmationMinDays} days on; stable disease counts from ${settings.sdMinDays} days after enrolment (enrolled ${longDate(enrolledOn)}, so from ${longDate(sdFrom)}).`
    : `The protocol does not require CR or PR to be confirmed; stable disease counts from ${settings.sdMinDays} days after enrolment (enrolled ${longDate(enrolledOn)}, so from ${longDate(sdFrom)}).`;
}

/** Why the best overall response is what it is: the confirmed response, the timepoint response, or what stood in the way. */
function bestSentences(timeline: Timeline, found: Best, steps: Map<Timepoint, DerivationStep>, rules: Rules): string[] {
  const { settings, enrolledOn, sdFrom } = rules;
  const { points, early } = timeline;
  const { best, basis, confirmed, pair } = found;
  if (best === null) {
    return [early.length > 0 ? 'No assessment on or after enrolment yet, so there is no best overall response.' : 'No assessment yet, so there is no best overall response.'];
  }
  if (confirmed && pair) {
    const confirmation = `confirmed by the ${pair.by.response} on ${longDate(pair.by.date)}, ${daysBetween(pair.start.date, pair.by.date)} days later`;
    return [
      pair.start.response === 'CR' && best === 'PR'
        ? `Best overall response: PR, confirmed. The CR on ${longDate(pair.start.date)} was not followed by another CR, so it is read as PR (RECIST 1.1); it was ${confirmation}.`
        : `Best overall response: ${best}, confirmed. The ${best} on ${longDate(pair.start.date)} was ${confirmation}.`,
    ];
  }
  if (!settings.confirmationRequired && (best === 'CR' || best === 'PR')) {
    return [`Best overall response: ${best}, the best timepoint response (first on ${longDate((basis as Timepoint).date)}); this protocol does not require confirmation.`];
  }
  const sentences = points
    .filter((p) => steps.get(p)?.role === 'unconfirmed')
    .map((point) => {
      const reason = brokenReason(statusOf(points, points.indexOf(point), settings) as Extract<ConfirmationStatus, { kind: 'broken' }>);
      return point.date >= sdFrom
        ? `The ${point.response} on ${longDate(point.date)} was not confirmed (${reason}); under RECIST 1.1 an unconfirmed response counts as stable disease, and it was ${daysBetween(enrolledOn, point.date)} days after enrolment, past the ${settings.sdMinDays}-day minimum.`
        : `The ${point.response} on ${longDate(point.date)} was not confirmed (${reason}); an unconfirmed response counts only as stable disease, and at ${daysBetween(enrolledOn, point.date)} days after enrolment it was too early for that (minimum ${settings.sdMinDays} days).`;
    });
  const at = longDate((basis as Timepoint).date);
  if (best === 'SD') {
    sentences.push(`Best overall response: SD. The ${(basis as Timepoint).response} on ${at}, ${daysBetween(enrolledOn, (basis as Timepoint).date)} days after enrolment, meets the ${settings.sdMinDays}-day minimum for stable disease.`);
  } else if (best === 'PD') {
    sentences.push(
      points.length === 1
        ? `Best overall response: PD. The first assessment after enrolment, on ${at}, showed progression.`
        : `Best overall response: PD. Progression on ${at} came before stable disease was established (no assessment of SD or better on or after ${longDate(sdFrom)}).`,
    );
  } else if (points.some((p) => p.response !== 'NE')) {
    sentences.push(`Best overall response: NE. No assessment of SD or better was on or after ${longDate(sdFrom)}, so stable disease is not established yet.`);
  } else {
    sentences.push('Best overall response: NE. No assessment after enrolment could be evaluated.');
  }
  return sentences;
}

function responderSentence(found: Best, status: Status): string[] {
  const { responder, awaiting } = status;
  if (responder === null && awaiting.length > 0) {
    return [`Responder status is pending: the ${awaiting[0].response} on ${longDate(awaiting[0].date)} awaits confirmation. Without it the best overall response is ${found.best}.`];
  }
  if (responder === null && found.best !== null) return ['Responder status is pending: without progression, a later assessment may still establish stable disease or a response.'];
  return responder !== null ? [`Derived outcome: ${responderWords(responder)}.`] : [];
}

function explanationOf(timeline: Timeline, found: Best, status: Status, steps: Map<Timepoint, DerivationStep>, rules: Rules): string[] {
  const { early, afterPd, progression } = timeline;
  const explanation = [protocolSentence(rules)];
  if (early.length > 0) {
    explanation.push(
      `${plural(early.length, 'assessment')} dated before enrolment ${early.length === 1 ? 'was' : 'were'} left out (${early.map((p) => longDate(p.date)).join(', ')}).`,
    );
  }
  explanation.push(...bestSentences(timeline, found, steps, rules));
  if (afterPd.length > 0) {
    explanation.push(`${plural(afterPd.length, 'assessment')} after progression on ${longDate((progression as Timepoint).date)} do${afterPd.length === 1 ? 'es' : ''} not count.`);
  }
  explanation.push(...responderSentence(found, status));
  return explanation;
}

/** What would settle the derivation: a first assessment, a confirmation, or an assessment late enough for SD. */
function neededOf(timeline: Timeline, found: Best, status: Status, rules: Rules): string[] {
  const { settings, enrolledOn, sdFrom } = rules;
  const needed: string[] = [];
  if (found.best === null) needed.push(`A first assessment on or after enrolment, due by ${longDate(plusDays(enrolledOn, settings.assessmentIntervalDays))} on the protocol's schedule.`);
  for (const open of found.pending) needed.push(neededSentence(open));
  if (status.unsettledNe && timeline.points.some((p) => p.response !== 'NE')) {
    needed.push(`An assessment of SD or better on or after ${longDate(sdFrom)} (${settings.sdMinDays} days after enrolment) to establish stable disease.`);
  }
  return needed;
}

/** What a site should look at: early dates, gaps in the schedule, SD seen too early, overdue confirmations, a disagreeing entered outcome. */
function attentionOf(timeline: Timeline, found: Best, status: Status, rules: Rules, entered: EnteredOutcome | undefined): AttentionItem[] {
  const { settings, enrolledOn, sdFrom, today } = rules;
  const attention: AttentionItem[] = timeline.early.map((point) => ({
    kind: 'assessment-before-enrolment',
    message: `The ${point.response} assessment on ${longDate(point.date)} is dated before enrolment on ${longDate(enrolledOn)}; correct its date or remove it.`,
    date: point.date,
    assessmentId: point.id,
  }));
  let previous = { date: enrolledOn, label: 'enrolment' };
  for (const point of timeline.points) {
    const gap = daysBetween(previous.date, point.date);
    if (gap > settings.assessmentIntervalDays) {
      attention.push({
        kind: 'gap-longer-than-schedule',
        message: `${gap} days passed between ${previous.label} on ${longDate(previous.date)} and the assessment on ${longDate(point.date)}; the protocol schedules assessments every ${settings.assessmentIntervalDays} days.`,
        date: point.date,
        assessmentId: point.id,
      });
    }
    previous = { date: point.date, label: 'the assessment' };
  }
  if (status.unsettledNe && timeline.points.some((p) => p.response !== 'NE')) {
    attention.push({
      kind: 'sd-before-minimum',
      message: `SD or better was seen only before ${longDate(sdFrom)}, the ${settings.sdMinDays}-day minimum after enrolment, so the best overall response stays NE.`,
      date: timeline.points.find((p) => p.response !== 'NE')?.date,
    });
  }
  for (const open of status.awaiting) {
    if (today > open.dueBy) {
      attention.push({
        kind: 'unconfirmed-past-window',
        message: `The ${open.response} on ${longDate(open.date)} is still unconfirmed: the next assessment was due by ${longDate(open.dueBy)}.`,
        date: open.date,
        assessmentId: open.assessmentId,
      });
    }
  }
  if (entered && disagreesWithDerivation(entered, { bestOverallResponse: found.best, responder: status.responder })) {
    const enteredText = `${entered.outcome === 'responder' ? 'responder' : 'non-responder'}${entered.bestOverallResponse ? `, ${entered.bestOverallResponse}` : ''}`;
    attention.push({
      kind: 'entered-disagrees',
      message: `The entered outcome (${enteredText}) disagrees with the one derived from the assessments (${responderWords(status.responder as boolean)}, ${found.best}).`,
    });
  }
  return attention;
}

/** Reads the timeline, finds the best overall response and the responder status, then explains them step by step. */
export function deriveBestOverallResponse(input: DerivationInput): Derivation {
  const { enrolledOn, settings } = input;
  const rules: Rules = { settings, enrolledOn, today: input.today ?? format(new Date(), 'yyyy-MM-dd'), sdFrom: plusDays(enrolledOn, settings.sdMinDays) };
  const timeline = timelineOf(input);
  const found = bestOverall(timeline, rules);
  const status = statusOfBest(found, timeline, settings);
  const steps = stepsOf(timeline, found, rules);
  return {
    bestOverallResponse: found.best,
    responder: status.responder,
    confirmed: found.confirmed,
    basisDate: found.basis?.date ?? null,
    steps: timeline.all.map((p) => steps.get(p) as DerivationStep),
    explanation: explanationOf(timeline, found, status, steps, rules),
    needed: neededOf(timeline, found, status, rules),
    attention: attentionOf(timeline, found, status, rules, input.entered),
    pendingConfirmation: found.pending,
    enrolledOn,
    settings,
    derivedOn: rules.today,
  };
}
