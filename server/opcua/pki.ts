import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { OPCUACertificateManager } from 'node-opcua';
import type { CertificateInfo } from '../../src/contracts/control-link';

/**
 * Yieldpoint's own OPC UA application instance certificate and its trust list, kept by node-opcua's certificate
 * manager in a PKI folder beside the database. The certificate is made once (self-signed, 10 years) and kept;
 * a server's certificate is trusted only by an admin's explicit action (`trust`), never automatically.
 */
export type AppPki = {
  manager: OPCUACertificateManager;
  applicationUri: string;
  applicationName: string;
  certificateFile: string;
  privateKeyFile: string;
  certificate(): CertificateInfo;
  trust(der: Buffer): Promise<void>;
  isTrusted(der: Buffer): Promise<boolean>;
  dispose(): Promise<void>;
};

export const APPLICATION_NAME = 'Yieldpoint';
export const pkiFolderBeside = (databaseFile: string) => path.join(path.dirname(path.resolve(databaseFile)), 'pki');

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

export async function openAppPki(folder: string): Promise<AppPki> {
  const manager = new OPCUACertificateManager({ rootFolder: folder, automaticallyAcceptUnknownCertificate: false });
  await manager.initialize();
  const applicationUri = `urn:${os.hostname()}:yieldpoint`;
  const certificateFile = path.join(manager.rootDir, 'own', 'certs', 'yieldpoint_certificate.pem');
  const privateKeyFile = path.join(manager.rootDir, 'own', 'private', 'private_key.pem');
  if (!fs.existsSync(certificateFile)) {
    await manager.createSelfSignedCertificate({
      applicationUri,
      subject: `/CN=${APPLICATION_NAME}@${os.hostname()}/O=Yieldpoint`,
      dns: [os.hostname()],
      startDate: new Date(Date.now() - 24 * 3_600_000),
      validity: 3650,
      outputFile: certificateFile,
    });
  }
  const der = () => Buffer.from(new crypto.X509Certificate(fs.readFileSync(certificateFile)).raw);
  return {
    manager,
    applicationUri,
    applicationName: APPLICATION_NAME,
    certificateFile,
    privateKeyFile,
    certificate: () => certificateInfo(der()),
    trust: (cert) => manager.trustCertificate(cert),
    isTrusted: async (cert) => (await manager.isCertificateTrusted(cert)) === 'Good',
    dispose: () => manager.dispose(),
  };
}
