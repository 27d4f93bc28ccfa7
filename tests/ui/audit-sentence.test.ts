import { describe, expect, it } from 'vitest';
import { auditChanges, auditSentence } from '../../src/components/audit/audit-sentence';

// Reading rules of this product's own audit trail (no outside source): a sentence per event, the changed fields only.
// Invented site formatting for the checks: EUR, and a stamp that marks what it formatted.
const SITE = { currency: 'EUR', stamp: (iso: string) => `stamp(${iso.slice(0, 10)})` };

describe('audit events as people read them', () => {
  it('names who did what to which record', () => {
    expect(auditSentence({ actor: 'a@site.test', action: 'recipe.release', entity: 'recipe', entityId: '2' })).toBe(
      'a@site.test released a new setpoint for recipe 2',
    );
    expect(auditSentence({ actor: 'a@site.test', action: 'change-request.create', entity: 'change-request', entityId: '4' })).toBe(
      'a@site.test proposed change request 4',
    );
    expect(auditSentence({ actor: 'a@site.test', action: 'sign-in', entity: 'user', entityId: '1' })).toBe('a@site.test signed in');
    expect(auditSentence({ actor: 'a@site.test', action: 'batch_settings.update', entity: 'batch_settings', entityId: '1' })).toBe(
      'a@site.test changed batch settings 1',
    );
  });

  it('lists only the fields that changed, old -> new', () => {
    expect(
      auditChanges({ oldValue: { setpointC: 35, releasedPlanId: null, recipeId: 2 }, newValue: { setpointC: 37, releasedPlanId: 5, recipeId: 2 } }, SITE),
    ).toEqual([
      { field: 'setpoint (°C)', before: '35', after: '37' },
      { field: 'released plan id', before: '–', after: '5' },
    ]);
    expect(auditChanges({ oldValue: null, newValue: { state: 'running' } }, SITE)).toEqual([{ field: 'state', before: '–', after: 'running' }]);
    expect(auditChanges({ oldValue: null, newValue: null }, SITE)).toEqual([]);
    expect(auditChanges({ oldValue: { setpointC: 37 }, newValue: { setpointC: 41.665850533952835 } }, SITE)).toEqual([
      { field: 'setpoint (°C)', before: '37', after: '41.6659' },
    ]);
    expect(auditChanges({ oldValue: null, newValue: { at: '2026-12-03T10:41:13.297Z', last: { takenAt: '2026-12-03T09:00:00.000Z' } } }, SITE)).toEqual([
      { field: 'at', before: '–', after: 'stamp(2026-12-03)' },
      { field: 'last', before: '–', after: '{"takenAt":"stamp(2026-12-03)"}' },
    ]);
    expect(
      auditChanges({ oldValue: null, newValue: { productPricePerKg: 0.4, heatingCostPerDegCHour: 0.6 } }, { ...SITE, currency: 'CHF' }).map((c) => c.field),
    ).toEqual(['product price (CHF/kg)', 'heating cost (CHF per °C·h)']);
  });
});
