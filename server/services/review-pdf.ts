/**
 * The gap review as a PDF (pdfkit, its built-in Helvetica; no font files read). One page or more:
 * the session's identity, the research-use caution, the headline comparison and every finding
 * with its verdict, text and figures.
 */
import PDFDocument from 'pdfkit';
import type { GapReview } from '../../shared/api/review';
import { figureText, pctText, pointsRangeText, pointsText, rangeText, VERDICT_LABEL } from '../../shared/review/format';

/**
 * Text the standard (WinAnsi) Helvetica can draw: Greek letters spelled out, a few symbols
 * replaced, anything else outside Latin-1 shown as '?'.
 */
export function pdfText(s: string): string {
  const map: Record<string, string> = { 'α': 'alpha', 'λ': 'lambda', '≥': '>=', '≤': '<=', '−': '-', '→': '->', '…': '...', 'ε': 'eps' };
  return s.replace(/[^\u0000-\u00ff–—‘’“”•]/g, (c) => map[c] ?? '?');
}

/** Renders the review; resolves with the PDF bytes. */
export function reviewPdf(r: GapReview): Promise<Buffer> {
  const doc = new PDFDocument({ size: 'A4', margin: 50, info: { Title: `Gap review, session ${r.sessionId}`, Author: 'Aftercue' } });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const t = (s: string) => pdfText(s);
  const width = doc.page.width - 100;

  doc.font('Helvetica-Bold').fontSize(18).text(t(`Gap review: session #${r.sessionId}`));
  doc.moveDown(0.3).font('Helvetica').fontSize(10).fillColor('#444444')
    .text(t(`Study ${r.studyName} · participant ${r.participantCode} · rig ${r.rigName}`))
    .text(t(`Decoder ${r.decoderName} (SHA-256 ${r.decoderSha256.slice(0, 16)}…) · classes ${r.classes.join(', ')}`))
    .text(t(`${r.startedAt ? `Session ${r.startedAt} to ${r.stoppedAt ?? '-'}` : 'Session never started'} · generated ${r.generatedAt}`));
  doc.moveDown(0.5).font('Helvetica-Bold').fillColor('#8a4b00').text(t(r.caution));

  doc.moveDown(0.8).fillColor('#000000').font('Helvetica-Bold').fontSize(13).text('Online against offline');
  doc.moveDown(0.3).font('Helvetica').fontSize(10);
  const lines: string[] = [];
  lines.push(r.online
    ? `Online accuracy (clean trials): ${pctText(r.online.accuracy)}, ${r.online.correct} of ${r.online.trials}, 95 % Wilson ${rangeText(r.online.wilson95)}`
    : 'Online accuracy: no clean trial with a known class.');
  if (r.onlineChance && r.onlineChance.accuracyNeeded <= 1) {
    lines.push(`Chance threshold for ${r.online?.trials ?? 0} trials (alpha = 0.05, Combrisson & Jerbi 2015): ${pctText(r.onlineChance.accuracyNeeded)}; `
      + `online is ${r.onlineChance.aboveChance ? 'above' : 'not above'} it.`);
  }
  lines.push(r.offline
    ? `Offline nested-CV accuracy: ${pctText(r.offline.accuracy)} over ${r.offline.trials} calibration trials, 95 % Wilson ${rangeText(r.offline.wilson95)}`
    : 'Offline accuracy: the decoder has no stored cross-validated estimate.');
  if (r.difference) {
    lines.push(`Online minus offline: ${pointsText(r.difference.value)}, 95 % ${pointsRangeText(r.difference.newcombe95)} `
      + '(Newcombe 1998, Stat Med 17:873-890, method 10).');
  }
  for (const l of lines) doc.text(t(l), { width });

  doc.moveDown(0.8).font('Helvetica-Bold').fontSize(13).text('Findings');
  for (const f of r.findings) {
    doc.moveDown(0.6).font('Helvetica-Bold').fontSize(11).fillColor('#000000').text(t(`${f.title}: ${VERDICT_LABEL[f.verdict]}`));
    doc.moveDown(0.2).font('Helvetica').fontSize(9.5).fillColor('#222222').text(t(f.text), { width });
    if (f.figures.length > 0) {
      doc.moveDown(0.2).fontSize(9).fillColor('#444444');
      for (const fig of f.figures) doc.text(t(`${fig.label}: ${figureText(fig)}`), { width, indent: 12 });
    }
  }
  doc.moveDown(1).font('Helvetica-Oblique').fontSize(8.5).fillColor('#666666').text(t(`Aftercue gap review. ${r.caution}`), { width });
  doc.end();
  return done;
}
