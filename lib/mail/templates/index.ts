import { accountExists } from "./account-exists";
import {
  billingCancellationScheduled,
  billingCancellationWithdrawn,
  billingPaymentFailed,
  billingPaymentReceived,
  billingPlanChanged,
  billingSubscriptionEnded,
  billingSubscriptionStarted,
} from "./billing";
import { batchDecided, batchReceived, reviewDigest, stationDecided } from "./intake";
import { magicLink } from "./magic-link";
import { passwordReset } from "./password-reset";
import { roleChanged } from "./role-changed";
import { seatInvitation } from "./seat-invitation";
import { verifyEmail } from "./verify-email";
import type { RenderedMail } from "./layout";

// Every e-mail template, by name. A template is a typed function from its data
// to { subject, html, text }. To add one: write `templates/<name>.ts` and add a
// line here; `queueMail({ template: "<name>", data })` is then type-checked.
export const templates = {
  "verify-email": verifyEmail,
  "magic-link": magicLink,
  "password-reset": passwordReset,
  "role-changed": roleChanged,
  "account-exists": accountExists,
  "billing-subscription-started": billingSubscriptionStarted,
  "billing-payment-received": billingPaymentReceived,
  "billing-plan-changed": billingPlanChanged,
  "billing-cancellation-scheduled": billingCancellationScheduled,
  "billing-cancellation-withdrawn": billingCancellationWithdrawn,
  "billing-payment-failed": billingPaymentFailed,
  "billing-subscription-ended": billingSubscriptionEnded,
  "seat-invitation": seatInvitation,
  "batch-received": batchReceived,
  "batch-decided": batchDecided,
  "station-decided": stationDecided,
  "review-digest": reviewDigest,
} satisfies Record<string, (data: never) => RenderedMail>;

export type TemplateName = keyof typeof templates;
export type TemplateData<K extends TemplateName> = Parameters<(typeof templates)[K]>[0];

export function renderTemplate<K extends TemplateName>(name: K, data: TemplateData<K>): RenderedMail {
  const fn = templates[name] as (d: TemplateData<K>) => RenderedMail;
  return fn(data);
}

export type { RenderedMail };
