import { and, desc, eq } from 'drizzle-orm';
import { first, returned, type Db } from '../../db/client';
import { certificateFiles, users } from '../../db/tables';

export const insertCertificate = (db: Db, row: Omit<typeof certificateFiles.$inferInsert, 'id'>) =>
  db.insert(certificateFiles).values(row).returning().then(returned);

export const latestCertificate = (db: Db, siteId: number, lotId: number) =>
  db
    .select({ file: certificateFiles, uploadedBy: users.name })
    .from(certificateFiles)
    .leftJoin(users, eq(certificateFiles.uploadedBy, users.id))
    .where(and(eq(certificateFiles.siteId, siteId), eq(certificateFiles.lotId, lotId)))
    .orderBy(desc(certificateFiles.uploadedAt), desc(certificateFiles.id))
    .then(first);
