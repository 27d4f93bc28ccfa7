import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { OPCUACertificateManager } from 'node-opcua';
import type { CertificateInfo } from '../../src/contracts/control-link';

/**
 * Yieldpoint's own OPC UA application instance certificate and its trust list, kept by node-opcua's certificate
 * manager in a PKI folder beside the database. The certificate is made once (self-signed, 10 years) and kept;
 * a server's certificate is trusted only by an admin's explicit action (`trust`), never automatically. Beside it, a
 * user certificate with a key of its own (`user/`), for servers that log readers in by certificate (an X509 user
 * token) rather than a user name; the plant's admin trusts it as a user.
 */
export type AppPki = {
  manager: OPCUACertificateManager;
  applicationUri: string;
  applicationName: string;
  certificateFile: string;
  privateKeyFile: string;
  certificate(): CertificateInfo;
  userCertificate(): CertificateInfo;
  /** The user certificate (DER) and its private key (PEM), for an X509 user token. */
  userIdentity(): { certificateData: Buffer; privateKey: string };
  trust(der: Buffer): Promise<void>;
  isTrusted(der: Buffer): Promise<boolean>;
  dispose(): Promise<void>;
};

export const APPLICATION_NAME = 'Yieldpoint';

/** OPC UA's thumbprint (SHA-1 of the DER certificate), as colon-separated hex; SHA-256 beside it. */
export function certificateInfo(der: Buffer): CertificateInfo {
  const x = new crypto.X509Certificate(der);
  const uri = x.subjectAltName?.split(/,\s*/).find((s) => s.startsWith('URI:'));
  return {
    thumbprint: x.fingerprint,
    sha256: x.fingerprint256,
    subject: x.subject.replace(/\n/g, ', '),
    applicationUri: uri ? uri.slice(4) : null,
    validFrom: new Date(x.validFrom).toISOString(),
    validTo: new Date(x.validTo).toISOString(),
  };
}

/** Same thumbprint whatever the case or separators. */
export const sameThumbprint = (a: string, b: string) => a.replace(/[^0-9a-f]/gi, '').toLowerCase() === b.replace(/[^0-9a-f]/gi, '').toLowerCase();

// The own certificates never change once made: read and parsed once (the status answer shows them).
const once = <T>(f: () => T) => {
  let v: T | undefined;
  return () => (v ??= f());
};
const derOf = (file: string) => Buffer.from(new crypto.X509Certificate(fs.readFileSync(file)).raw);

/** A certificate kept in the manager's own folder, made once (self-signed, 10 years) with the manager's key. */
async function ownCertificate(manager: OPCUACertificateManager, file: string, subject: string, applicationUri: string) {
  if (fs.existsSync(file)) return;
  await manager.createSelfSignedCertificate({
    applicationUri,
    subject,
    dns: [os.hostname()],
    startDate: new Date(Date.now() - 24 * 3_600_000),
    validity: 3650,
    outputFile: file,
  });
}

export async function openAppPki(folder: string): Promise<AppPki> {
  const manager = new OPCUACertificateManager({ rootFolder: folder, automaticallyAcceptUnknownCertificate: false });
  await manager.initialize();
  const applicationUri = `urn:${os.hostname()}:yieldpoint`;
  const certificateFile = path.join(manager.rootDir, 'own', 'certs', 'yieldpoint_certificate.pem');
  const privateKeyFile = path.join(manager.rootDir, 'own', 'private', 'private_key.pem');
  await ownCertificate(manager, certificateFile, `/CN=${APPLICATION_NAME}@${os.hostname()}/O=Yieldpoint`, applicationUri);
  // The user certificate has a key of its own: the application's key never signs a user token.
  const userManager = new OPCUACertificateManager({ rootFolder: path.join(manager.rootDir, 'user'), automaticallyAcceptUnknownCertificate: false });
  await userManager.initialize();
  const userCertificateFile = path.join(userManager.rootDir, 'own', 'certs', 'yieldpoint_user_certificate.pem');
  await ownCertificate(userManager, userCertificateFile, `/CN=yieldpoint-reader@${os.hostname()}/O=Yieldpoint`, `${applicationUri}:user`);
  const userKeyFile = path.join(userManager.rootDir, 'own', 'private', 'private_key.pem');
  return {
    manager,
    applicationUri,
    applicationName: APPLICATION_NAME,
    certificateFile,
    privateKeyFile,
    certificate: once(() => certificateInfo(derOf(certificateFile))),
    userCertificate: once(() => certificateInfo(derOf(userCertificateFile))),
    userIdentity: () => ({ certificateData: derOf(userCertificateFile), privateKey: fs.readFileSync(userKeyFile, 'utf8') }),
    trust: (cert) => manager.trustCertificate(cert),
    isTrusted: async (cert) => (await manager.isCertificateTrusted(cert)) === 'Good',
    dispose: async () => {
      await manager.dispose();
      await userManager.dispose();
    },
  };
}
