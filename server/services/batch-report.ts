// The batch report: the whole batch record as CSV, streamed a page of readings at a time.
import { type BatchDetail } from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { csvLines } from '../csv';
import { readingsAfter } from '../repositories/batches';
import type { Services } from '../context';
import { nextTurn } from '../next-turn';
import { batchRecord } from './batch-detail';

// The report of a long record is written a page of readings at a time, other requests served in between.
const REPORT_PAGE = 5_000;

/**
 * The batch record as section/field/value rows: recipe, plan, status, readings and deviations, spreadsheet-safe.
 * The batch is checked at once (not found, wrong site); the CSV itself comes in parts.
 */
export async function batchReportCsv(s: Services, u: SessionUser, id: number): Promise<{ filename: string; parts: AsyncGenerator<string> }> {
  const record = await batchRecord(s, u, id, []);
  return { filename: `batch-${record.batch.id}.csv`, parts: reportParts(s, record) };
}

async function* reportParts(s: Services, record: Omit<BatchDetail, 'readingsTotal'>): AsyncGenerator<string> {
  const { batch: b, deviations: devs, status, settings, signatures: signed } = record;
  const p = b.program;
  const rows: unknown[][] = [
    ['batch', 'id', b.id, ''],
    ['batch', 'recipe', b.recipeName, ''],
    ['batch', 'vessel', b.vesselName, ''],
    ['batch', 'lot', b.lotCode, ''],
    ['batch', 'state', b.state, ''],
    ['batch', 'started_at_utc', b.startedAt, ''],
    ['batch', 'started_by', b.startedBy, ''],
    ['batch', 'closed_at_utc', b.closedAt, ''],
    ['batch', 'closed_by', b.closedBy, ''],
    ['batch', 'close_comment', b.closeComment, ''],
    ['plan', 'source', p.source === 'released_plan' ? 'released plan' : 'recipe current setpoint', ''],
    ['plan', 'plan_id', p.planId, ''],
    ['plan', 'batch_length', p.batchH, 'h'],
    ...p.stages.map((st, i) => ['plan', `stage_${i + 1}`, `${st.hours} h at ${st.c}`, 'h, degC']),
    ['plan', 'fill_temperature', p.fillC, 'degC'],
    ['plan', 'planned_product', p.plannedProductGPerL, 'g/L'],
    ['plan', 'p10_product', p.p10GPerL, 'g/L'],
    ['plan', 'tolerance_band', settings.toleranceC, '+/- degC'],
    ['plan', 'gap_limit', settings.gapLimitMin, 'min'],
    ['plan', 'vessel_max', p.vessel.maxC, 'degC'],
    ['status', 'readings', status.readings, ''],
    ['status', 'activity_left', status.activityLeft, 'fraction'],
    ['status', 'product_so_far', status.productSoFarGPerL, 'g/L'],
    ['status', 'forecast_product', status.forecastGPerL, 'g/L'],
    ['status', 'thermal_dose', status.equivalentHAtRef, `h at ${status.refC} degC`],
    ['status', 'forecast_at_close', b.forecastAtCloseGPerL, 'g/L'],
    ['status', 'measured_product', b.measuredProductGPerL, 'g/L'],
    ...(signed.length
      ? signed.map((g) => [
          'signature',
          `${g.printedName} (${g.role})`,
          g.meaning,
          `${g.signedAt} ${g.comment}; change request ${g.changeRequestId}; record ${g.recordHash}`,
        ])
      : [['signature', 'none', p.source === 'released_plan' ? 'no signature found for the plan' : 'runs the recipe current setpoint', '']]),
  ];
  yield csvLines([['section', 'field', 'value', 'detail'], ...rows]);
  for (let after: { takenAt: string; id: number } | null = null; ;) {
    await nextTurn();
    const page = await readingsAfter(s.db, b.id, REPORT_PAGE, after);
    if (page.length)
      yield csvLines(page.map(({ reading: r, enteredBy }) => ['reading', r.takenAt, r.c, `degC; ${r.source}; ${enteredBy}${r.note ? `; ${r.note}` : ''}`]));
    if (page.length < REPORT_PAGE) break;
    after = page.at(-1)!.reading;
  }
  yield csvLines([
    ...devs.map((d) => [
      'deviation',
      `${d.id} ${d.kind} at ${d.at}`,
      d.message,
      [
        d.state,
        d.acknowledgedBy ? `acknowledged by ${d.acknowledgedBy} ${d.acknowledgedAt}: ${d.acknowledgeComment}` : null,
        d.closedBy ? `closed by ${d.closedBy} ${d.closedAt}${d.closeComment ? `: ${d.closeComment}` : ''}` : null,
        d.corrective ? `suggested ${d.corrective.setpointC.toFixed(1)} degC from hour ${d.corrective.fromH.toFixed(1)}` : null,
      ]
        .filter(Boolean)
        .join('; '),
    ]),
  ]);
}
