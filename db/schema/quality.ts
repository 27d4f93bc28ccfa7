import { index, integer, real, sqliteTable, text } from 'drizzle-orm/sqlite-core';
import type { AssayFit } from '../../src/contracts/assays';
import { ASSAY_SOURCES, CERTIFICATE_MIME_TYPES, RESIDUAL_SCALES } from '../../src/enums';
import { lots } from './catalog';
import { createdAt, sites, users } from './core';

// A lot's certificate of analysis: the bytes live on disk under the data folder, named by their SHA-256.
export const certificateFiles = sqliteTable(
  'certificate_files',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    lotId: integer('lot_id')
      .notNull()
      .references(() => lots.id),
    fileName: text('file_name').notNull(),
    mimeType: text('mime_type', { enum: CERTIFICATE_MIME_TYPES }).notNull(),
    sizeBytes: integer('size_bytes').notNull(),
    sha256: text('sha256').notNull(),
    uploadedBy: integer('uploaded_by').references(() => users.id),
    uploadedAt: text('uploaded_at').notNull(),
  },
  (t) => [index('certificate_files_lot_idx').on(t.lotId)],
);

// A set of residual-activity measurements on a lot, with the engine's fit as it was when uploaded.
export const assays = sqliteTable(
  'assays',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    lotId: integer('lot_id')
      .notNull()
      .references(() => lots.id),
    source: text('source', { enum: ASSAY_SOURCES }).notNull(),
    fileName: text('file_name'),
    scale: text('scale', { enum: RESIDUAL_SCALES }).notNull(),
    scaleNote: text('scale_note').notNull(),
    fit: text('fit', { mode: 'json' }).$type<AssayFit>(),
    fitProblem: text('fit_problem'),
    pointCount: integer('point_count').notNull(),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('assays_lot_idx').on(t.lotId)],
);

export const assayPoints = sqliteTable(
  'assay_points',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    assayId: integer('assay_id')
      .notNull()
      .references(() => assays.id),
    // The line of the uploaded file (or the row of the typed table), so a question about a point can be traced.
    line: integer('line').notNull(),
    tempC: real('temp_c').notNull(),
    timeH: real('time_h').notNull(),
    residual: real('residual').notNull(),
    // Free text exactly as given; escaped only when written back out to CSV.
    note: text('note'),
  },
  (t) => [index('assay_points_assay_idx').on(t.assayId)],
);
