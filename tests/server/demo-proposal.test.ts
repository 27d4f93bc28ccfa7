import { first } from '../../db/client';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mailOutbox, sites } from '../../db/tables';
import { DEMO_SITE_NAME } from '../../db/seed';
import { proposeDemoChange } from '../../server/services/demo-proposal';
import { password, startTestApp, type TestApp } from './harness';

// The demo's waiting sign-off goes through the app's own services: a supervisor can review and e-sign it.
describe('demo proposal', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
    const site = (await t.db.select().from(sites).where(eq(sites.name, DEMO_SITE_NAME)).then(first))!;
    await proposeDemoChange({ db: t.db, clock: t.clock, mail: null, linkUrl: 'http://localhost:8080' }, site.id);
  });
  afterAll(() => t.close());

  it('waits for the supervisor with an intact record, the planner’s setpoint and a mail', async () => {
    const supervisor = await t.signIn('supervisor');
    const list = await supervisor.get('/api/change-requests?status=proposed');
    expect(list.status).toBe(200);
    const mine = (list.body as { changeRequests: { id: number; recipeName: string; proposedBy: string }[] }).changeRequests;
    expect(mine).toHaveLength(1);
    expect(mine[0]).toMatchObject({ recipeName: 'Lactose-free milk base', proposedBy: 'Tomasz Ekwueme' });

    const detail = await supervisor.get(`/api/change-requests/${mine[0]!.id}`);
    expect(detail.body).toMatchObject({ status: 'proposed', isIntact: true });
    const plan = await supervisor.get(`/api/plans/${(detail.body as { planId: number }).planId}`);
    expect((detail.body as { rationale: string }).rationale).toContain(`${(plan.body as { outputs: { setpointC: number } }).outputs.setpointC.toFixed(1)} °C`);

    const mails = (await t.db.select().from(mailOutbox).execute()).filter((m) => m.kind === 'change-request.proposed');
    expect(mails.map((m) => m.to)).toContain('supervisor@haldenbay.test');

    const signed = await supervisor.post(`/api/change-requests/${mine[0]!.id}/signatures`, {
      password: password('supervisor'),
      meaning: 'approved',
      comment: '',
    });
    expect(signed.status).toBe(201);
    expect(signed.body).toMatchObject({ status: 'approved' });
  });

  it('leaves the other site alone', async () => {
    const other = await t.signIn('supervisor', 'other');
    expect((await other.get('/api/change-requests?status=proposed')).body).toEqual({ changeRequests: [] });
  });
});
