import { vancomycinGoti2018 } from '@ebbtide/kinetics';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type SignedInClient } from './support/sign-in';
import { auditRows, ensureTestModels, TEST_MODELS } from './casework-helpers';

const { app, db } = createTestApp();
let admin: SignedInClient;
let pharmacist: SignedInClient;

beforeAll(async () => {
  await ensureTestModels(db);
  admin = await signedInAgent(app, 'admin');
  pharmacist = await signedInAgent(app, 'pharmacist');
});
afterAll(() => db.destroy());

const newId = () =>
  `site-vancomycin-${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`;

describe('GET /api/drug-models', () => {
  it('when a pharmacist lists the library, then the engine models are there with their version', async () => {
    // Act
    const res = await pharmacist.get('/api/drug-models?pageSize=100');
    // Assert
    expect(res.status).toBe(200);
    const ids = res.body.items.map((m: { id: string }) => m.id);
    expect(ids).toEqual(expect.arrayContaining(Object.values(TEST_MODELS)));
    expect(
      res.body.items.find((m: { id: string }) => m.id === TEST_MODELS.vancomycin)
        .plausibleSingleDoseMg,
    ).toEqual({ min: 250, max: 4500 });
  });

  it('when signed out, then it answers 401', async () => {
    // Assert
    expect((await anonymousAgent(app).get('/api/drug-models')).status).toBe(401);
  });
});

describe('POST /api/drug-models', () => {
  it('when an admin adds a valid model twice under one id, then versions 1 and 2 are stored and audited', async () => {
    // Arrange
    const id = newId();
    const body = {
      id,
      drug: 'vancomycin',
      name: 'Site vancomycin model',
      source: 'local validation 2026',
      definition: { ...vancomycinGoti2018, id },
      plausibleSingleDoseMg: { min: 250, max: 4000 },
    };
    // Act
    const v1 = await admin.post('/api/drug-models').send(body);
    const v2 = await admin
      .post('/api/drug-models')
      .send({ ...body, name: 'Site vancomycin model, revised' });
    // Assert
    expect(v1.status).toBe(201);
    expect(v2.body.version).toBe(2);
    expect(await db('drug_models').where({ id })).toHaveLength(2);
    expect((await auditRows(db, 'drug-model', `${id}@2`))[0].action).toBe('drug-model.create');
    expect((await pharmacist.get(`/api/drug-models/${id}`)).body.version).toBe(2);
    expect((await pharmacist.get(`/api/drug-models/${id}?version=1`)).body.name).toBe(
      'Site vancomycin model',
    );
  });

  it('when the definition fails the engine validator, then it answers 400 listing the problems and stores nothing', async () => {
    // Arrange
    const id = newId();
    // Act
    const res = await admin.post('/api/drug-models').send({
      id,
      drug: 'vancomycin',
      name: 'Broken',
      source: 'none',
      definition: {
        ...vancomycinGoti2018,
        id,
        structure: { compartments: 3, elimination: 'linear' },
      },
      plausibleSingleDoseMg: { min: 250, max: 4000 },
    });
    // Assert
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.definition.join(' ')).toMatch(/structure/);
    expect(await db('drug_models').where({ id })).toHaveLength(0);
  });

  it('when a pharmacist tries to add a model, then it answers 403', async () => {
    // Act
    const res = await pharmacist.post('/api/drug-models').send({});
    // Assert
    expect(res.status).toBe(403);
  });
});
