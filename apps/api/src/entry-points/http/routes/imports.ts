import { Router, type Request, type Response } from 'express';
import multer from 'multer';
import {
  csvImportFormSchema,
  csvMappingSchema,
  fhirImportRequestSchema,
  idParamsSchema,
} from '@ebbtide/contracts';
import type { Db } from '../../../data-access/db';
import { importCsv } from '../../../domain/imports/csv';
import { importFhirBundle } from '../../../domain/imports/fhir';
import { AppError } from '../../../lib/app-error';
import { CLINICAL_STAFF, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

/** CSV files up to 1 MB, held in memory only for the request. */
const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: 1024 * 1024, files: 1 },
});

function receiveFile(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) =>
    upload.single('file')(req, res, (err: unknown) => {
      if (!err) return resolve();
      const e = err as { code?: string; message?: string };
      reject(
        new AppError('validation-failed', 'The upload was refused', 400, {
          fieldErrors: {
            file: [
              e.code === 'LIMIT_FILE_SIZE'
                ? 'the file is larger than 1 MB'
                : (e.message ?? 'unreadable upload'),
            ],
          },
        }),
      );
    }),
  );
}

/** Imports: CSV of doses or levels into a course, FHIR R4 bundles. Pharmacist and reviewer only. */
export function importRoutes(db: Db): Router {
  const router = Router();
  defineRoute(router, {
    method: 'post',
    path: '/courses/:id/imports/csv',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', idParamsSchema);
      await receiveFile(req, res);
      const form = parseRequest(req, 'body', csvImportFormSchema);
      if (!req.file)
        throw new AppError('validation-failed', 'Attach the CSV file', 400, {
          fieldErrors: { file: ['required'] },
        });
      let mapping;
      if (form.mapping) {
        let raw: unknown;
        try {
          raw = JSON.parse(form.mapping);
        } catch {
          throw new AppError('validation-failed', 'The column mapping is not valid JSON', 400, {
            fieldErrors: { mapping: ['not valid JSON'] },
          });
        }
        const parsed = csvMappingSchema.safeParse(raw);
        if (!parsed.success)
          throw new AppError('validation-failed', 'The column mapping is not valid', 400, {
            fieldErrors: { mapping: ['an object of field -> column header'] },
          });
        mapping = parsed.data;
      }
      const result = await importCsv(db, requireActor(req), id, {
        kind: form.kind,
        mode: form.mode,
        mapping,
        text: req.file.buffer.toString('utf8'),
      });
      res.status(result.committed ? 201 : 200).json(result);
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/imports/fhir',
    allow: CLINICAL_STAFF,
    handler: async (req, res) => {
      const body = parseRequest(req, 'body', fhirImportRequestSchema);
      const result = await importFhirBundle(db, requireActor(req), {
        bundle: body.bundle as Record<string, unknown>,
        mode: body.mode,
        courseId: body.courseId,
      });
      res.status(result.committed ? 201 : 200).json(result);
    },
  });
  return router;
}
