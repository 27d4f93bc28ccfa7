import express, { Router, type RequestHandler } from 'express';
import { BillingSummary, BuySeats, ChangeSeats, CheckoutStarted, InvoiceList } from '../../src/contracts/billing';
import { allow, currentUser, open } from '../middleware/auth';
import { billingReturnPage, billingSummary, changeSeats, siteInvoices, startCheckout } from '../services/billing';
import type { AppContext } from '../context';
import { handleStripeEvent } from '../services/billing-webhooks';

export function billingRouter(ctx: AppContext): Router {
  const router = Router();
  router.get('/', allow('billing.manage'), async (req, res) => {
    res.json(BillingSummary.parse(await billingSummary(ctx, currentUser(req))));
  });
  router.get('/invoices', allow('billing.manage'), async (req, res) => {
    res.json(InvoiceList.parse(await siteInvoices(ctx, currentUser(req))));
  });
  router.post('/checkout', allow('billing.manage'), async (req, res) => {
    const body = BuySeats.parse(req.body);
    const origin = `${req.protocol}://${req.get('host')}`;
    res.status(201).json(CheckoutStarted.parse(await startCheckout(ctx, currentUser(req), body, origin)));
  });
  // Open: the browser comes back from the payment page without its session cookie (see billingReturnPage).
  router.get('/return', open, (req, res) => {
    res.type('html').send(billingReturnPage(req.query));
  });
  router.patch('/seats', allow('billing.manage'), async (req, res) => {
    const body = ChangeSeats.parse(req.body);
    res.json(BillingSummary.parse(await changeSeats(ctx, currentUser(req), body)));
  });
  return router;
}

/**
 * POST /api/billing/webhook, mounted before the API's JSON parser: the signature covers the raw bytes.
 * No session and no client header: the payment provider calls it, and the signature is the proof.
 */
export function billingWebhook(ctx: AppContext): RequestHandler[] {
  return [
    express.raw({ type: '*/*', limit: '512kb' }),
    async (req, res) => {
      const raw = Buffer.isBuffer(req.body) ? req.body : Buffer.alloc(0);
      const out = await handleStripeEvent(ctx, raw, req.get('stripe-signature'));
      res.json({ received: true, duplicate: out.duplicate });
    },
  ];
}
