import { z } from 'zod';
import { SECURITY_MODES, SECURITY_POLICIES, SOURCE_UNITS } from '../enums';

export { SECURITY_MODES, SECURITY_POLICIES, SOURCE_UNITS };

/**
 * Reactor temperatures read from the plant's control system over OPC UA (IEC 62541). Read-only: Yieldpoint
 * reads, subscribes, browses and reads history; it never writes to the plant.
 */
export const LINK_STATES = ['connected', 'connecting', 'disconnected', 'refused', 'idle', 'disabled', 'off'] as const;

const optionalText = (max: number) => z.string().trim().max(max).optional();

/** An admin's source for one vessel. Security None needs `allowInsecure: true`, and is audited as such. */
export const VesselSourceInput = z
  .strictObject({
    endpointUrl: z
      .string()
      .trim()
      .regex(/^opc\.tcp:\/\/[^\s/:]+(:\d{1,5})?(\/\S*)?$/, 'An OPC UA address such as opc.tcp://historian.plant:4840'),
    nodeId: z.string().trim().min(3, 'The node id of the temperature variable, e.g. ns=2;s=R101.TT01').max(300),
    unit: z.enum(SOURCE_UNITS).default('degC'),
    securityPolicy: z.enum(SECURITY_POLICIES).default('Basic256Sha256'),
    securityMode: z.enum(SECURITY_MODES).default('SignAndEncrypt'),
    userName: optionalText(120),
    /** Kept to log in to the server; never sent back. Omitted on a change: the stored one stays. */
    password: z.string().max(200).optional(),
    /** Log in with Yieldpoint's user certificate (X509 user token; the plant's admin trusts it) instead of a user name. */
    userCertificate: z.boolean().default(false),
    isEnabled: z.boolean().default(true),
    allowInsecure: z.boolean().optional(),
  })
  .superRefine((v, ctx) => {
    if (v.userCertificate && v.userName)
      ctx.addIssue({ code: 'custom', path: ['userCertificate'], message: 'Log in with a user name or with the user certificate, not both' });
    if (v.userCertificate && v.securityPolicy === 'None')
      ctx.addIssue({ code: 'custom', path: ['userCertificate'], message: 'A user certificate needs a secured connection (a security policy other than None)' });
    const none = [v.securityPolicy === 'None', v.securityMode === 'None'];
    if (none[0] !== none[1]) ctx.addIssue({ code: 'custom', path: ['securityMode'], message: 'Policy None goes with mode None, and only with it' });
    else if (none[0] && v.allowInsecure !== true)
      ctx.addIssue({
        code: 'custom',
        path: ['allowInsecure'],
        message: 'Security None sends the temperatures and the password in clear: confirm it to choose it',
      });
  });
export type VesselSourceInput = z.input<typeof VesselSourceInput>;
export type VesselSourceParsed = z.output<typeof VesselSourceInput>;

export const VesselSource = z.object({
  vesselId: z.number().int(),
  vesselName: z.string(),
  endpointUrl: z.string(),
  nodeId: z.string(),
  unit: z.enum(SOURCE_UNITS),
  securityPolicy: z.enum(SECURITY_POLICIES),
  securityMode: z.enum(SECURITY_MODES),
  userName: z.string().nullable(),
  hasPassword: z.boolean(),
  userCertificate: z.boolean(),
  isEnabled: z.boolean(),
  /** SHA-1 thumbprint (OPC UA's) of the server certificate an admin trusted; null until one did. */
  trustedThumbprint: z.string().nullable(),
  trustedAt: z.string().nullable(),
  updatedAt: z.string(),
});
export type VesselSource = z.infer<typeof VesselSource>;
export const VesselSourceList = z.object({ sources: z.array(VesselSource) });
export type VesselSourceList = z.infer<typeof VesselSourceList>;

/** A certificate as an admin compares it with what the plant's owner reads out. */
export const CertificateInfo = z.object({
  thumbprint: z.string(),
  sha256: z.string(),
  subject: z.string(),
  applicationUri: z.string().nullable(),
  validFrom: z.string(),
  validTo: z.string(),
});
export type CertificateInfo = z.infer<typeof CertificateInfo>;

export const TrustRequest = z.strictObject({
  thumbprint: z
    .string()
    .trim()
    .regex(/^[0-9a-fA-F:]{40,59}$/, 'The SHA-1 thumbprint shown with the certificate'),
});
export type TrustRequest = z.infer<typeof TrustRequest>;

/** How the site samples its tags. */
export const LinkSettings = z.object({
  samplingIntervalMs: z.number().int().min(100, 'At least 100 ms').max(600_000, 'At most 10 min'),
  /** Absolute deadband in °C: a change smaller than this is not reported. */
  deadbandC: z.number().min(0).max(5, 'At most 5 °C'),
});
export type LinkSettings = z.infer<typeof LinkSettings>;
export const DEFAULT_LINK_SETTINGS: LinkSettings = { samplingIntervalMs: 1000, deadbandC: 0.05 };
export const LinkSettingsPatch = LinkSettings.partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change');
export type LinkSettingsPatch = z.infer<typeof LinkSettingsPatch>;

export const LinkStatus = z.object({
  vesselId: z.number().int(),
  vesselName: z.string(),
  batchId: z.number().int().nullable(),
  state: z.enum(LINK_STATES),
  lastValueC: z.number().nullable(),
  /** Source time of the last good value. */
  lastValueAt: z.string().nullable(),
  ageS: z.number().nullable(),
  lastError: z.string().nullable(),
  errors: z.number().int(),
  stored: z.number().int(),
});
export type LinkStatus = z.infer<typeof LinkStatus>;
/** `certificate`: Yieldpoint's application certificate; `userCertificate`: its user certificate (X509 user login). */
export const LinkStatusList = z.object({ links: z.array(LinkStatus), certificate: CertificateInfo.nullable(), userCertificate: CertificateInfo.nullable() });
export type LinkStatusList = z.infer<typeof LinkStatusList>;

export const LinkGap = z.object({ fromAt: z.string(), toAt: z.string(), reason: z.string() });
export type LinkGap = z.infer<typeof LinkGap>;
/** What a batch page shows of its vessel's link: the state now and the spans the link could not fill. */
export const BatchLink = z.object({ link: LinkStatus.nullable(), gaps: z.array(LinkGap) });
export type BatchLink = z.infer<typeof BatchLink>;
