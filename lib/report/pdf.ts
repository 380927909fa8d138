/**
 * The service report as a PDF, drawn with pdfkit on the server: the parties, the as-found / as-left table with
 * tolerances and verdicts, screw heights, the spindle sweep, instruments, a top view of the screws with the moves
 * made, sign-offs with the drawn signature, the hash chain's head, and the safety line. Figures in one unit system,
 * stated on the first page. Levelwire's look: paper, graphite ink, spirit green, bubble amber.
 */
import PDFDocument from 'pdfkit';
import type { UnitSystem } from '@/lib/leveling/units';
import { STAGE_GUIDES } from '@/lib/session/stages';
import type { MeasureRow, ScrewMoves, SweepFigures } from '@/lib/session/summary';
import { durationText, heightText, measureText, pdfSafe, signedHeightText, toleranceText, turnsText, unitsText, utcText } from './format';
import type { ReportInput } from './model';

const C = {
  paper: '#f6f4ee',
  ink: '#14171b',
  soft: '#4a525c',
  rule: '#d9d5ca',
  spirit: '#0f5d4e',
  spiritDeep: '#0a4237',
  vial: '#c6e23a',
  bubble: '#f2a516',
  pass: '#1b7a3d',
  fail: '#b3261e',
  steel: '#2b3440',
  white: '#ffffff',
};

const PAGE = { width: 595.28, height: 841.89 };
const M = { top: 48, bottom: 60, left: 44, right: 44 };
const X0 = M.left;
const W = PAGE.width - M.left - M.right;
const BOTTOM = PAGE.height - M.bottom;

/** The safety and limits line every report carries. */
export const SAFETY_LINE =
  'Levelwire advises; it does not replace the machine builder’s instructions, local codes or licensed practice, which come first. ' +
  'Raising a machine is heavy work: rated jacks on firm footing, nobody under a raised machine, hands clear of pads and screws, power locked out inside the enclosure.';

type Doc = PDFKit.PDFDocument;
type Verdict = boolean | null;

type Column = { title: string; width: number; align?: 'left' | 'right' | 'center' };
type Cell = string | { text: string; verdict?: Verdict; mono?: boolean; bold?: boolean; note?: string };

class Writer {
  y = M.top;
  constructor(readonly doc: Doc) {}

  /** Room for `h` points below y, else a new page. */
  need(h: number) {
    if (this.y + h > BOTTOM) {
      this.doc.addPage();
      this.y = M.top;
    }
  }

  text(s: string, opts: { size?: number; bold?: boolean; color?: string; x?: number; width?: number; gap?: number; mono?: boolean } = {}) {
    const { size = 9.5, bold = false, color = C.ink, x = X0, width = W, gap = 2, mono = false } = opts;
    const t = pdfSafe(s);
    this.doc.font(mono ? 'Courier' : bold ? 'Helvetica-Bold' : 'Helvetica').fontSize(size);
    const h = this.doc.heightOfString(t, { width });
    this.need(h);
    this.doc.fillColor(color).text(t, x, this.y, { width });
    this.y += h + gap;
  }

  /** A section heading, kept with the `keep` points of content that follow it. */
  heading(s: string, keep = 40) {
    this.need(30 + keep);
    this.y += 8;
    this.doc.rect(X0, this.y, 4, 14).fill(C.spirit);
    this.doc.font('Helvetica-Bold').fontSize(12).fillColor(C.spiritDeep).text(pdfSafe(s), X0 + 10, this.y + 1.5, { width: W - 10, lineBreak: false });
    this.y += 22;
  }

  /** Label / value pairs in two columns. */
  facts(pairs: [string, string][]) {
    const labelW = 110;
    for (const [label, value] of pairs) {
      this.doc.font('Helvetica').fontSize(9.5);
      const h = Math.max(this.doc.heightOfString(pdfSafe(value), { width: W - labelW }), 12);
      this.need(h + 2);
      this.doc.font('Helvetica').fontSize(8.5).fillColor(C.soft).text(pdfSafe(label), X0, this.y + 0.8, { width: labelW - 8 });
      this.doc.font('Helvetica').fontSize(9.5).fillColor(C.ink).text(pdfSafe(value), X0 + labelW, this.y, { width: W - labelW });
      this.y += h + 3;
    }
  }

  chip(verdict: Verdict, x: number, y: number) {
    const label = verdict === true ? 'PASS' : verdict === false ? 'FAIL' : '';
    if (!label) return;
    this.doc.roundedRect(x, y, 34, 12, 6).fill(verdict ? C.pass : C.fail);
    this.doc.font('Helvetica-Bold').fontSize(7.5).fillColor(C.white).text(label, x, y + 2.6, { width: 34, align: 'center', lineBreak: false });
  }

  table(columns: Column[], rows: Cell[][]) {
    const pad = 4;
    const header = () => {
      this.doc.font('Helvetica-Bold').fontSize(8);
      const h = Math.max(...columns.map((c) => this.doc.heightOfString(pdfSafe(c.title), { width: c.width - 2 * pad }))) + 2 * pad;
      this.need(h + 16);
      this.doc.rect(X0, this.y, W, h).fill(C.steel);
      let x = X0;
      for (const c of columns) {
        this.doc.fillColor(C.white).text(pdfSafe(c.title), x + pad, this.y + pad, { width: c.width - 2 * pad, align: c.align ?? 'left' });
        x += c.width;
      }
      this.y += h;
    };
    header();
    rows.forEach((row, i) => {
      const cells = row.map((c) => (typeof c === 'string' ? { text: c } : c));
      const heights = cells.map((c, j) => {
        if (c.verdict !== undefined && c.text === '') return 12;
        this.doc.font(c.mono ? 'Courier' : c.bold ? 'Helvetica-Bold' : 'Helvetica').fontSize(9);
        let h = this.doc.heightOfString(pdfSafe(c.text), { width: columns[j]!.width - 2 * pad });
        if (c.note) h += this.doc.font('Helvetica').fontSize(7).heightOfString(pdfSafe(c.note), { width: columns[j]!.width - 2 * pad }) + 1;
        return h;
      });
      const h = Math.max(...heights) + 2 * pad;
      if (this.y + h > BOTTOM) {
        this.doc.addPage();
        this.y = M.top;
        header();
      }
      if (i % 2 === 1) this.doc.rect(X0, this.y, W, h).fill(C.paper);
      let x = X0;
      cells.forEach((c, j) => {
        const col = columns[j]!;
        if (c.verdict !== undefined && c.text === '') {
          this.chip(c.verdict, x + (col.width - 34) / 2, this.y + (h - 12) / 2);
        } else {
          this.doc
            .font(c.mono ? 'Courier' : c.bold ? 'Helvetica-Bold' : 'Helvetica')
            .fontSize(9)
            .fillColor(c.verdict === false ? C.fail : C.ink)
            .text(pdfSafe(c.text), x + pad, this.y + pad, { width: col.width - 2 * pad, align: col.align ?? 'left' });
          if (c.note) {
            this.doc.font('Helvetica').fontSize(7).fillColor(C.soft).text(pdfSafe(c.note), x + pad, this.doc.y + 1, { width: col.width - 2 * pad, align: col.align ?? 'left' });
          }
        }
        x += col.width;
      });
      this.y += h;
      this.doc.moveTo(X0, this.y).lineTo(X0 + W, this.y).lineWidth(0.5).strokeColor(C.rule).stroke();
    });
    this.y += 6;
  }
}

/** Levelwire's mark: a vial with its bubble on a taut line (as components/ui/wordmark.tsx draws it). */
function drawMark(doc: Doc, x: number, y: number, s = 1) {
  doc.save().translate(x, y).scale(s);
  doc.moveTo(0, 17).lineTo(34, 17).lineWidth(2).strokeColor(C.white).stroke();
  doc.roundedRect(4, 2, 26, 11, 5.5).lineWidth(1.6).fillAndStroke(C.vial, C.white);
  doc.ellipse(17, 7.5, 4.5, 3).lineWidth(1.2).fillAndStroke(C.paper, C.ink);
  doc.moveTo(11, 2.5).lineTo(11, 12.5).moveTo(23, 2.5).lineTo(23, 12.5).lineWidth(1).strokeColor(C.ink).stroke();
  doc.restore();
}

function drawHeader(w: Writer, input: ReportInput) {
  const { doc } = w;
  doc.rect(0, 0, PAGE.width, 78).fill(C.spirit);
  drawMark(doc, X0, 20, 1.2);
  doc.font('Helvetica-Bold').fontSize(20).fillColor(C.white).text('Levelwire', X0 + 50, 20, { lineBreak: false });
  doc.font('Helvetica').fontSize(10.5).fillColor(C.white).text('Leveling service report', X0 + 50, 45, { lineBreak: false });
  const approved = input.signOff.approval !== null;
  const badge = approved ? 'Approved' : 'Draft: not yet approved';
  doc.font('Helvetica-Bold').fontSize(9);
  const bw = doc.widthOfString(badge) + 20;
  doc.roundedRect(X0 + W - bw, 28, bw, 20, 10).fill(approved ? C.vial : C.bubble);
  doc.fillColor(C.ink).text(badge, X0 + W - bw, 34, { width: bw, align: 'center', lineBreak: false });
  w.y = 96;
}

const verdictWord = { pass: 'PASS: every measure is within its tolerance as left', fail: 'FAIL: a measure is outside its tolerance as left', incomplete: 'INCOMPLETE: a measure has no as-left value' };

function measureCells(row: MeasureRow, units: UnitSystem): Cell[] {
  const side = (v: MeasureRow['asFound'] | MeasureRow['asLeft']): Cell =>
    v.value === null ? { text: 'not measured', note: v.reason } : { text: measureText(v.value, row, units), verdict: v.pass, note: 'source' in v && v.source === 'last-round' ? `last round (${STAGE_GUIDES[v.stage].title})` : undefined };
  const asLeftVerdict = row.asLeft.value === null ? undefined : row.asLeft.pass;
  return [
    { text: row.label },
    { text: toleranceText(row, units) },
    side(row.asFound),
    side(row.asLeft),
    { text: asLeftVerdict === undefined ? 'missing' : asLeftVerdict === null ? 'shown only' : '', verdict: asLeftVerdict ?? null },
  ];
}

function sweepRows(f: SweepFigures, units: UnitSystem): [string, string][] {
  const len = (um: number) => measureText(um, { unit: 'um', signed: true }, units);
  return [
    ['Circle', `${heightText(f.diameterMm, units)} diameter, ${STAGE_GUIDES[f.stage].title} stage, ${utcText(f.at)}`],
    ['Readings', `left ${len(f.leftUm)}, right ${len(f.rightUm)}, front ${len(f.frontUm)}, back ${len(f.backUm)}`],
    ['TIR (four points)', measureText(f.analysis.tirUm, { unit: 'um', signed: false }, units)],
    ['Full-circle TIR of the tilt', measureText(f.analysis.fullCircleTirUm, { unit: 'um', signed: false }, units)],
    ['Right - left / back - front', `${len(f.rightUm - f.leftUm)} / ${len(f.backUm - f.frontUm)}`],
    ['Tram tilt', `X ${measureText(f.analysis.xUrad, { unit: 'urad', signed: true }, units)}, Y ${measureText(f.analysis.yUrad, { unit: 'urad', signed: true }, units)}`],
    ['Closure', `${len(f.analysis.closureUm)} (should be near zero; if not, suspect the table, a loose arm or runout)`],
  ];
}

/** The top view of the screws (+x to the right, +y, the back, up the page) with each screw's total turns and raise. */
function drawTopView(w: Writer, input: ReportInput) {
  const { doc } = w;
  const moves = new Map(input.summary.moves.byScrew.map((m) => [m.screwId, m]));
  const screws = input.screws;
  const boxH = 260;
  const top = w.y;
  doc.rect(X0, top, W, boxH).fill(C.paper);
  if (screws.length === 0) {
    doc.font('Helvetica').fontSize(9).fillColor(C.soft).text('The session recorded no footprint.', X0 + 12, top + 12);
    w.y = top + boxH + 8;
    return;
  }
  const xs = screws.map((s) => s.xMm);
  const ys = screws.map((s) => s.yMm);
  const [minX, maxX, minY, maxY] = [Math.min(...xs, 0), Math.max(...xs, 0), Math.min(...ys, 0), Math.max(...ys, 0)];
  const padX = 120;
  const padY = 50;
  const scale = Math.min((W - 2 * padX) / Math.max(maxX - minX, 1), (boxH - 2 * padY) / Math.max(maxY - minY, 1));
  const cx = X0 + W / 2 - ((minX + maxX) / 2) * scale;
  const cy = top + boxH / 2 + ((minY + maxY) / 2) * scale;
  const px = (xMm: number) => cx + xMm * scale;
  const py = (yMm: number) => cy - yMm * scale;

  // The base's outline through the outermost screws, and the table centre.
  doc.rect(px(minX) - 14, py(maxY) - 14, (maxX - minX) * scale + 28, (maxY - minY) * scale + 28).lineWidth(1).fillAndStroke('#ece8dd', C.rule);
  doc.moveTo(px(0) - 8, py(0)).lineTo(px(0) + 8, py(0)).moveTo(px(0), py(0) - 8).lineTo(px(0), py(0) + 8).lineWidth(0.8).strokeColor(C.soft).stroke();
  doc.font('Helvetica').fontSize(7).fillColor(C.soft).text('table centre', px(0) + 5, py(0) + 4, { lineBreak: false });
  doc.font('Helvetica-Bold').fontSize(8).fillColor(C.soft);
  doc.text('BACK (+Y)', X0, top + 8, { width: W, align: 'center', lineBreak: false });
  doc.text('FRONT (operator side)', X0, top + boxH - 16, { width: W, align: 'center', lineBreak: false });
  doc.text('+X', X0 + W - 24, top + boxH / 2 - 4, { lineBreak: false });

  for (const s of screws) {
    const m = moves.get(s.id);
    const x = px(s.xMm);
    const y = py(s.yMm);
    const fill = s.kind === 'corner' ? C.spirit : s.kind === 'middle' ? C.white : C.bubble;
    doc.circle(x, y, 9).lineWidth(1.6).fillAndStroke(fill, C.spiritDeep);
    doc.font('Helvetica-Bold').fontSize(8).fillColor(C.ink);
    const labelRight = s.xMm >= 0;
    const tx = labelRight ? x + 26 : x - 26 - 80;
    const align = labelRight ? 'left' : 'right';
    doc.text(pdfSafe(s.label), tx, y - 14, { width: 80, align, lineBreak: false });
    doc.font('Helvetica').fontSize(7.5).fillColor(C.ink);
    const done = m?.done ?? 0;
    const line1 = done > 0 ? `${turnsText(m!.turns)} turn (${Math.round(Math.abs(m!.turns) * 360)}°)` : 'not turned';
    doc.text(pdfSafe(line1), tx, y - 4, { width: 80, align, lineBreak: false });
    if (done > 0 && m) {
      const raise = m.raiseUm >= 0;
      const words = `${raise ? 'raise' : 'lower'} ${heightText(Math.abs(m.raiseUm) / 1000, input.units)}`;
      doc.fillColor(raise ? C.pass : C.fail).text(pdfSafe(words), tx, y + 6, { width: 80, align, lineBreak: false });
      drawArrow(doc, labelRight ? x + 17 : x - 17, y + 2, raise);
    }
  }
  // Legend, below the drawing.
  const ly = top + boxH + 4;
  doc.circle(X0 + 14, ly + 4, 4).fillAndStroke(C.spirit, C.spiritDeep);
  doc.font('Helvetica').fontSize(7).fillColor(C.soft).text('corner', X0 + 21, ly + 1, { lineBreak: false });
  doc.circle(X0 + 60, ly + 4, 4).fillAndStroke(C.white, C.spiritDeep);
  doc.fillColor(C.soft).text('middle', X0 + 67, ly + 1, { lineBreak: false });
  doc.circle(X0 + 106, ly + 4, 4).fillAndStroke(C.bubble, C.spiritDeep);
  doc.fillColor(C.soft).text('outrigger', X0 + 113, ly + 1, { lineBreak: false });
  doc.text('Arrows: raise (up) or lower (down) of the base at the screw, total of the moves done.', X0 + 10, ly + 12, { width: W - 20, lineBreak: false });
  w.y = top + boxH + 30;
}

function drawArrow(doc: Doc, x: number, y: number, up: boolean) {
  const color = up ? C.pass : C.fail;
  const [tip, tail] = up ? [y - 8, y + 6] : [y + 6, y - 8];
  doc.moveTo(x, tail).lineTo(x, tip).lineWidth(1.4).strokeColor(color).stroke();
  const d = up ? 4 : -4;
  doc.moveTo(x - 3, tip + d).lineTo(x, tip).lineTo(x + 3, tip + d).lineWidth(1.4).strokeColor(color).stroke();
}

/** The reviewer's drawn signature as vector strokes, scaled into a box. */
function drawSignature(doc: Doc, sig: NonNullable<ReportInput['signOff']['approval']>['signature'], x: number, y: number, boxW: number, boxH: number) {
  doc.rect(x, y, boxW, boxH).lineWidth(0.6).strokeColor(C.rule).stroke();
  const s = Math.min((boxW - 8) / Math.max(sig.width, 1), (boxH - 8) / Math.max(sig.height, 1));
  const ox = x + (boxW - sig.width * s) / 2;
  const oy = y + (boxH - sig.height * s) / 2;
  doc.save().lineWidth(1.3).lineCap('round').lineJoin('round').strokeColor(C.ink);
  for (const stroke of sig.strokes) {
    if (stroke.length < 4) continue;
    doc.moveTo(ox + stroke[0]! * s, oy + stroke[1]! * s);
    for (let i = 2; i + 1 < stroke.length; i += 2) doc.lineTo(ox + stroke[i]! * s, oy + stroke[i + 1]! * s);
    doc.stroke();
  }
  doc.restore();
}

function movesTable(w: Writer, rows: ScrewMoves[], units: UnitSystem) {
  w.table(
    [
      { title: 'Screw', width: 70 },
      { title: 'Kind', width: 70 },
      { title: 'Moves done', width: 70, align: 'right' },
      { title: 'Total turns', width: 80, align: 'right' },
      { title: 'Wrench swing', width: 80, align: 'right' },
      { title: 'Raise of the base', width: W - 370, align: 'right' },
    ],
    rows.map((m) => [
      { text: m.label, bold: true },
      m.kind,
      `${m.done}${m.cannot > 0 ? ` (+${m.cannot} can't)` : ''}`,
      turnsText(m.turns),
      `${Math.round(m.turns * 360)}°`,
      m.done === 0 ? '-' : `${m.raiseUm >= 0 ? 'raise' : 'lower'} ${heightText(Math.abs(m.raiseUm) / 1000, units)}`,
    ]),
  );
}

/** Renders the report; resolves with the PDF's bytes. */
export function renderReportPdf(input: ReportInput): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margins: M,
    bufferPages: true,
    info: {
      Title: `Leveling service report ${input.machine.serial} ${input.visitDate}`,
      Author: input.organisation,
      Subject: `${input.machine.model} ${input.machine.serial} at ${input.customer}`,
      Creator: 'Levelwire',
      Producer: 'Levelwire',
      CreationDate: input.generatedAt,
    },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  const w = new Writer(doc);
  const { units, summary } = input;
  drawHeader(w, input);

  w.facts([
    ['Service company', input.organisation],
    ['Customer', input.customer],
    ['Site', [input.site.name, input.site.address].filter(Boolean).join(', ')],
    ['Machine', `${input.machine.model}, serial ${input.machine.serial}`],
    ['Visit date', `${input.visitDate}${input.fromVisit ? '' : ' (the session’s first day; no visit recorded)'}`],
    ['Technician', input.technician],
    ['Expert', input.experts.length > 0 ? input.experts.join(', ') : 'none'],
    ['Figures in', unitsText(units)],
  ]);

  w.y += 4;
  w.need(30);
  const verdictColor = summary.asLeftVerdict === 'pass' ? C.pass : summary.asLeftVerdict === 'fail' ? C.fail : C.bubble;
  doc.rect(X0, w.y, W, 24).fill(verdictColor);
  doc.font('Helvetica-Bold').fontSize(11).fillColor(C.white).text(pdfSafe(`As left: ${verdictWord[summary.asLeftVerdict]}`), X0 + 10, w.y + 7, { width: W - 20, lineBreak: false });
  w.y += 32;

  w.heading('As found and as left');
  w.table(
    [
      { title: 'Measure', width: 138 },
      { title: 'Tolerance', width: 108 },
      { title: 'As found', width: 98 },
      { title: 'As left', width: 98 },
      { title: 'As left result', width: W - 442, align: 'center' },
    ],
    summary.measures.map((r) => measureCells(r, units)),
  );
  const lastRound = summary.measures.filter((r) => r.asLeft.value !== null && 'source' in r.asLeft && r.asLeft.source === 'last-round').length;
  w.text(
    `As found: each measure’s first completed round. As left: the last completed round of the lock-and-as-left stage${lastRound > 0 ? '; where it lacks a measure, that measure’s last round (marked)' : ''}. Figures in red lie outside their tolerance. Tilt is judged on its size either way; twist, bow and TIR on the value.`,
    { size: 7.5, color: C.soft },
  );

  w.heading('Screw heights');
  w.table(
    [
      { title: 'Screw', width: 56 },
      { title: 'Specified', width: 124 },
      { title: 'As found', width: 105 },
      { title: 'As left (last reading)', width: 140 },
      { title: 'Result', width: W - 425, align: 'center' },
    ],
    summary.heights.map((h) => {
      const fig = (f: (typeof h)['asFound']): Cell =>
        'heightMm' in f ? { text: heightText(f.heightMm, units), note: f.deviationMm === null ? undefined : `${signedHeightText(f.deviationMm, units)} from specified` } : { text: 'not read' };
      const asLeft = fig(h.asLeft);
      if (typeof asLeft !== 'string' && h.raisedSinceUm !== 0) asLeft.note = `${asLeft.note ? `${asLeft.note}; ` : ''}moved ${signedHeightText(h.raisedSinceUm / 1000, units)} since`;
      const pass = 'heightMm' in h.asLeft ? h.asLeft.pass : null;
      return [
        { text: h.label, bold: true },
        h.specifiedHeightMm === null ? 'not specified' : `${heightText(h.specifiedHeightMm, units)} ± ${heightText(h.toleranceMm, units)}`,
        fig(h.asFound),
        asLeft,
        pass === null ? { text: 'not judged' } : { text: '', verdict: pass },
      ];
    }),
  );

  w.heading('Spindle sweep', 120);
  for (const [title, f] of [
    ['As found', summary.sweep.asFound],
    ['As left', summary.sweep.asLeft],
  ] as const) {
    w.text(title, { bold: true, size: 10 });
    if ('analysis' in f) w.facts(sweepRows(f, units));
    else w.text(`Not measured: ${f.reason}.`, { color: C.soft });
  }

  w.heading('The work');
  w.facts([
    ['Adjustment rounds', `${summary.rounds.count} (a round: moves answered done one after another, closed by the readings that check them)`],
    ['Moves', `${summary.moves.sent} sent, ${summary.moves.done} done, ${summary.moves.cannot} could not be made, ${summary.moves.pending} left unanswered`],
    ['Started', summary.duration.startedAt ? utcText(summary.duration.startedAt) : 'unknown'],
    ['Duration', summary.duration.totalMs === null ? 'unknown' : `${durationText(summary.duration.totalMs)} from opening to the last entry, review included`],
    ['Time live', summary.duration.liveMs === null ? `unknown (${summary.duration.liveReason ?? ''})` : durationText(summary.duration.liveMs)],
    ['Photos', summary.photos.length === 0 ? 'none' : summary.photos.map((p) => `${p.caption || 'photo'} (${STAGE_GUIDES[p.stage].title})`).join('; ')],
  ]);

  w.heading('Instruments');
  if (summary.instruments.length === 0) w.text('No instruments were recorded for this visit.', { color: C.soft });
  else
    w.table(
      [
        { title: 'Kind', width: 60 },
        { title: 'Model', width: 130 },
        { title: 'Serial', width: 90 },
        { title: 'Calibrated', width: 75 },
        { title: 'Due', width: 75 },
        { title: 'At the visit', width: W - 430 },
      ],
      summary.instruments.map((i) => [
        i.kind,
        i.model,
        i.serial,
        i.calibratedOn ?? 'not recorded',
        i.calibrationDue,
        { text: i.certificateLater ? 'unknown: certificate on file is later' : i.status === 'current' ? 'in calibration' : i.status === 'due-soon' ? 'due soon' : 'past due', verdict: i.status === 'expired' && !i.certificateLater ? false : undefined, note: i.overrideReason ? `used by override: ${i.overrideReason}` : undefined },
      ]),
    );

  w.heading('Top view of the screws and the moves made', 300);
  drawTopView(w, input);
  movesTable(w, summary.moves.byScrew, units);

  w.heading('Sign-offs');
  w.facts([
    ['Technician', `${input.technician}${input.signOff.technicianFinishedAt ? `, finished at ${utcText(input.signOff.technicianFinishedAt)}` : ', not finished'}`],
    ['Returned for rework', input.signOff.returns === 0 ? 'never' : `${input.signOff.returns} time${input.signOff.returns === 1 ? '' : 's'}`],
  ]);
  const approval = input.signOff.approval;
  if (approval) {
    w.need(100);
    doc.font('Helvetica').fontSize(8.5).fillColor(C.soft).text('Reviewer', X0, w.y + 0.8, { width: 102 });
    doc.font('Helvetica-Bold').fontSize(10).fillColor(C.ink).text(pdfSafe(approval.name), X0 + 110, w.y, { width: 200 });
    doc.font('Helvetica').fontSize(9).fillColor(C.ink).text(`approved at ${utcText(approval.at)}`, X0 + 110, w.y + 14, { width: 200 });
    drawSignature(doc, approval.signature, X0 + 320, w.y, W - 320, 80);
    doc.font('Helvetica').fontSize(7).fillColor(C.soft).text('signature as drawn', X0 + 320, w.y + 82, { width: W - 320, align: 'center' });
    w.y += 98;
  } else {
    w.facts([['Reviewer', 'Not yet approved']]);
  }

  w.heading('Record');
  if (input.chain.ok) {
    w.facts([
      ['Events', `${input.chain.count} in the session’s log, hash chain verified`],
      ['Chain head', input.chain.head],
    ]);
  } else {
    w.text(`The hash chain does not verify: broken at event ${input.chain.brokenAtSeq} (${input.chain.reason}).`, { bold: true, color: C.fail });
  }
  w.text(`Generated ${utcText(input.generatedAt)} from the session’s log.`, { size: 8, color: C.soft });

  w.y += 6;
  const note = pdfSafe(SAFETY_LINE);
  doc.font('Helvetica').fontSize(8);
  const nh = doc.heightOfString(note, { width: W - 24 });
  w.need(nh + 14);
  doc.rect(X0, w.y, 5, nh + 12).fill(C.bubble);
  doc.rect(X0 + 5, w.y, W - 5, nh + 12).fill('#fdf3dc');
  doc.fillColor(C.ink).text(note, X0 + 14, w.y + 6, { width: W - 24 });
  w.y += nh + 16;

  // Footer on every page (margins lifted so the footer line does not start a new page).
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc.moveTo(X0, PAGE.height - 40).lineTo(X0 + W, PAGE.height - 40).lineWidth(0.5).strokeColor(C.rule).stroke();
    doc
      .font('Helvetica')
      .fontSize(7.5)
      .fillColor(C.soft)
      .text(pdfSafe(`Levelwire service report · ${input.machine.model} ${input.machine.serial} · ${input.visitDate}`), X0, PAGE.height - 34, { width: W / 2 + 80, lineBreak: false });
    doc.text(`page ${i - range.start + 1} of ${range.count}`, X0 + W - 100, PAGE.height - 34, { width: 100, align: 'right', lineBreak: false });
    doc.page.margins.bottom = bottom;
  }
  doc.end();
  return done;
}
