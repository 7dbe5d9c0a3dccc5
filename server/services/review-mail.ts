/**
 * Sending a gap review to the study's investigator (its owner: the account that created the
 * study): plain text with the headline and each finding's verdict, the PDF attached.
 */
import type { GapReview } from '../../shared/api/review';
import { pctText, pointsRangeText, pointsText, VERDICT_LABEL } from '../../shared/review/format';
import type { MailMessage } from './mail';

/** The mail for `to`; `link` opens the review page. */
export function reviewMail(r: GapReview, to: { email: string; displayName: string }, link: string, sender: string, pdf: Buffer): MailMessage {
  const headline = r.online && r.offline && r.difference
    ? `Online ${pctText(r.online.accuracy)} (${r.online.correct} of ${r.online.trials} clean trials) against offline `
      + `${pctText(r.offline.accuracy)} (${r.offline.trials} calibration trials): ${pointsText(r.difference.value)}, `
      + `95 % ${pointsRangeText(r.difference.newcombe95)}.`
    : r.online ? `Online ${pctText(r.online.accuracy)} (${r.online.correct} of ${r.online.trials} clean trials); the decoder has no offline estimate.`
      : 'No clean trial with a known class was recorded.';
  const text = [
    `Hello ${to.displayName},`,
    '',
    `${sender} sends you the gap review of pilot session #${r.sessionId} (study ${r.studyName}, participant ${r.participantCode}, `
      + `decoder ${r.decoderName}).`,
    '',
    headline,
    '',
    'Findings:',
    ...r.findings.map((f) => `- ${f.title}: ${VERDICT_LABEL[f.verdict]}`),
    '',
    `The full review is attached as a PDF and online at ${link}`,
    '',
    r.caution,
  ].join('\n');
  return {
    to: to.email, subject: `Gap review: session #${r.sessionId}, ${r.studyName}`, text,
    attachments: [{ fileName: `session-${r.sessionId}-gap-review.pdf`, contentType: 'application/pdf', content: pdf }],
  };
}
