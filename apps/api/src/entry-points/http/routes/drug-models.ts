import { Router } from 'express';
import { drugModelCreateSchema, drugModelListQuerySchema } from '@ebbtide/contracts';
import { z } from 'zod';
import type { Db } from '../../../data-access/db';
import {
  addDrugModel,
  browseDrugModels,
  getDrugModel,
} from '../../../domain/drug-models/drug-models';
import { ADMINS, defineRoute, requireActor } from '../access';
import { parseRequest } from '../middlewares/validate';

const modelParams = z.object({ id: z.string().min(1).max(80) });
const versionQuery = z.object({ version: z.coerce.number().int().min(1).optional() });

/** The drug-model library: any signed-in user reads it; an admin adds models or versions. */
export function drugModelRoutes(db: Db): Router {
  const router = Router();
  defineRoute(router, {
    method: 'get',
    path: '/drug-models',
    allow: 'signed-in',
    handler: async (req, res) => {
      res.json(await browseDrugModels(db, parseRequest(req, 'query', drugModelListQuerySchema)));
    },
  });
  defineRoute(router, {
    method: 'get',
    path: '/drug-models/:id',
    allow: 'signed-in',
    handler: async (req, res) => {
      const { id } = parseRequest(req, 'params', modelParams);
      const { version } = parseRequest(req, 'query', versionQuery);
      res.json(await getDrugModel(db, id, version));
    },
  });
  defineRoute(router, {
    method: 'post',
    path: '/drug-models',
    allow: ADMINS,
    handler: async (req, res) => {
      const body = parseRequest(req, 'body', drugModelCreateSchema);
      res.status(201).json(await addDrugModel(db, requireActor(req), body));
    },
  });
  return router;
}
