/**
 * A funding-bid pack for one school: its rooms in the programme, the evidence (predicted CO2 and, where
 * monitor readings exist, measured), capital with on-costs, carbon saved over the units' life and capital
 * per tonne CO2e, pupils helped, with the assumptions and cautions. A PDF, one per school.
 */
import { PROGRAMME_CAUTIONS } from '../../engine/programme/cautions';
import { formatGbp, formatInt, formatOneDecimal } from '../../engine/format';
import { sumBreakdowns } from '../../engine/programme/on-costs';
import type { RoomLine } from '../../engine/programme/report';
import { MIN_DAYS_TO_COMPARE } from '../../engine/measured';
import { AppError } from '../http/errors';
import { box, COLOURS, createDocument, footers, heading, paragraph, table } from './pdf-kit';
import { assumptionsAndCautions } from './board-report';
import type { ProgrammeView } from './programme.types';

/** The school's rooms in the programme, in programme order. */
export function schoolRooms(
  view: ProgrammeView,
  schoolId: string,
): { rooms: RoomLine[]; visitsGbp: number; schoolName: string } {
  const rooms: RoomLine[] = [];
  let visitsGbp = 0;
  let schoolName = '';
  for (const y of view.report.years)
    for (const w of y.windows)
      for (const s of w.schools)
        if (s.schoolId === schoolId) {
          schoolName = s.schoolName;
          rooms.push(...s.rooms);
          visitsGbp += s.mobilisation?.chargedGbp ?? 0;
        }
  return { rooms, visitsGbp, schoolName };
}

/** Builds the pack; 404 when the school has no rooms in the programme (or is not visible). */
export async function bidPackPdf(
  view: ProgrammeView,
  schoolId: string,
  trustName: string,
  now = new Date(),
): Promise<Buffer> {
  const { rooms, visitsGbp, schoolName } = schoolRooms(view, schoolId);
  if (rooms.length === 0)
    throw new AppError(404, 'not_found', 'That school has no rooms in this programme, so there is no bid pack for it.');
  const title = `Funding bid: ventilation with heat recovery at ${schoolName}`;
  const { doc, done } = createDocument(title, `Bid pack from the programme “${view.name}”`);
  const roomCapital = rooms.reduce((s, r) => s + r.capital.chargedGbp, 0);
  const capital = roomCapital + visitsGbp;
  const pupils = rooms.reduce((s, r) => s + r.pupils, 0);
  const pupilHours = rooms.reduce((s, r) => s + r.pupilHoursRemovedPerYear, 0);
  const kg = rooms.reduce((s, r) => s + r.annualSavingKgCo2e, 0);
  const lifetime = rooms.reduce((s, r) => s + (r.lifetimeTonnesCo2e ?? 0), 0);
  const units = rooms.reduce((s, r) => s + r.units, 0);
  const measured = rooms.filter((r) => r.measuredMeanCo2Ppm != null).length;

  doc.font('bold').fontSize(18).fillColor(COLOURS.brand).text(title);
  doc.font('body').fontSize(10).fillColor(COLOURS.muted);
  doc.text(`${trustName} · programme “${view.name}” · ${now.toISOString().slice(0, 10)}`);
  doc.text(`Assessment results: assumption version ${view.source.assumptionsVersions.join(', ') || 'not recorded'}`);
  doc.moveDown(0.8).fillColor(COLOURS.ink);
  box(
    doc,
    'The bid in brief',
    `${formatInt(rooms.length)} teaching room${rooms.length === 1 ? '' : 's'} at ${schoolName} get ${formatInt(units)} heat-recovery ventilation ` +
      `unit${units === 1 ? '' : 's'} for ${formatGbp(capital)} with on-costs${visitsGbp > 0 ? ` (including ${formatGbp(visitsGbp)} for the contractor's visits)` : ''}. ` +
      `They help ${formatInt(pupils)} pupils and remove about ${formatInt(pupilHours)} pupil-hours of poor air a year. ` +
      `They save about ${formatOneDecimal(kg / 1000)} tonnes CO2e a year, ${formatOneDecimal(lifetime)} tonnes over the units' life` +
      (lifetime > 0 ? `: ${formatGbp(capital / lifetime)} of capital per tonne CO2e.` : '.'),
  );
  box(doc, 'Caution', PROGRAMME_CAUTIONS.slice(0, 2).join(' '), '#fbf1e3');

  heading(doc, 'The rooms and the evidence');
  paragraph(
    doc,
    measured > 0
      ? `Predicted CO2 comes from Airtally's model of each room (the worst season's occupied-period mean and peak); measured CO2 from the school's monitor readings where they exist (${measured} of ${rooms.length} rooms): the occupied-period mean of the stalest season with at least ${MIN_DAYS_TO_COMPARE} school days of readings.`
      : "Predicted CO2 comes from Airtally's model of each room (the worst season's occupied-period mean and peak). No monitor readings are held for these rooms: add measurements to strengthen the bid.",
    { colour: COLOURS.muted },
  );
  table(
    doc,
    [
      { header: 'Room', width: 0.15 },
      { header: 'When', width: 0.15 },
      { header: 'Units', width: 0.16 },
      { header: 'Predicted mean / peak CO2 (ppm)', width: 0.13, align: 'right' },
      { header: 'Measured mean CO2, worst season (ppm)', width: 0.1, align: 'right' },
      { header: 'Pupils', width: 0.07, align: 'right' },
      { header: 'Pupil-hours removed a year', width: 0.11, align: 'right' },
      { header: 'Capital with on-costs', width: 0.13, align: 'right' },
    ],
    rooms.map((r) => ({
      cells: [
        `${r.roomCode} ${r.roomName}`.trim(),
        `${view.report.years[r.year - 1]?.windows.find((w) => w.windowId === r.windowId)?.label ?? view.yearLabels[r.year - 1]}`,
        r.unitsLabel,
        `${formatInt(r.predictedMeanCo2Ppm)} / ${formatInt(r.predictedPeakCo2Ppm)}`,
        r.measuredMeanCo2Ppm == null ? 'none held' : formatInt(r.measuredMeanCo2Ppm),
        formatInt(r.pupils),
        formatInt(r.pupilHoursRemovedPerYear),
        formatGbp(r.capital.chargedGbp),
      ],
    })),
  );

  heading(doc, 'Carbon');
  table(
    doc,
    [
      { header: 'Room', width: 0.25 },
      { header: 'kgCO2e saved a year', width: 0.18, align: 'right' },
      { header: 'Tonnes over unit life', width: 0.18, align: 'right' },
      { header: 'Capital per tonne CO2e', width: 0.2, align: 'right' },
      { header: 'Money saved a year', width: 0.19, align: 'right' },
    ],
    [
      ...rooms.map((r) => ({
        cells: [
          `${r.roomCode} ${r.roomName}`.trim(),
          formatInt(r.annualSavingKgCo2e),
          r.lifetimeTonnesCo2e === null ? 'unknown' : formatOneDecimal(r.lifetimeTonnesCo2e),
          r.lifetimeTonnesCo2e && r.lifetimeTonnesCo2e > 0
            ? formatGbp(r.capital.chargedGbp / r.lifetimeTonnesCo2e)
            : 'no saving',
          formatGbp(r.annualSavingGbp),
        ],
      })),
      {
        bold: true,
        cells: [
          'School total (with visits)',
          formatInt(kg),
          formatOneDecimal(lifetime),
          lifetime > 0 ? formatGbp(capital / lifetime) : 'no saving',
          formatGbp(rooms.reduce((s, r) => s + r.annualSavingGbp, 0)),
        ],
      },
    ],
  );

  heading(doc, 'Costs with on-costs');
  const b = sumBreakdowns(rooms.map((r) => r.capital));
  table(
    doc,
    [
      { header: 'Item', width: 0.6 },
      { header: 'Amount', width: 0.4, align: 'right' },
    ],
    [
      { cells: ['Installed price of the units (catalogue)', formatGbp(b.worksGbp)] },
      { cells: ['Preliminaries', formatGbp(b.preliminariesGbp)] },
      { cells: ['Project and design team fees', formatGbp(b.feesGbp)] },
      { cells: ['Contingency (risk allowance)', formatGbp(b.contingencyGbp)] },
      { cells: ['Inflation to the year of the works', formatGbp(b.inflationGbp)] },
      { cells: ['Net of VAT', formatGbp(b.netGbp)], bold: true },
      {
        cells: [
          `VAT${view.settings.onCosts.vatRecoverable ? ' (recovered by the trust, not charged to the budget)' : ''}`,
          formatGbp(b.vatGbp),
        ],
      },
      { cells: ["Contractor's visits (mobilisation with on-costs)", formatGbp(visitsGbp)] },
      { cells: ['Capital charged to the programme', formatGbp(capital)], bold: true },
    ],
    9,
  );

  heading(doc, 'Why these rooms');
  for (const r of rooms) paragraph(doc, `${r.roomCode}: ${r.riskReason}`);

  assumptionsAndCautions(doc, view);
  footers(doc, title);
  doc.end();
  return done;
}
