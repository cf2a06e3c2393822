import type { Request, Response } from 'express';
import type { Knex } from 'knex';
import type { RouteTable } from './table.ts';
import type { Config } from '../config.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { PutCertificateWaiver, PutCommissioning } from '../../shared/schemas/commissioning.ts';
import { BadRequestError, HttpError, NotFoundError } from '../errors.ts';
import { receiveFile } from './job-work.ts';
import { CommissioningService } from '../services/commissioning.ts';
import { CertificateLinks, CertificatesService, type CertificateClaims } from '../services/certificates.ts';
import { LinkError } from '../services/links.ts';
import type { FilesService, Upload } from '../services/files.ts';
import { findVisible } from '../services/scope.ts';
import { Job } from '../models/index.ts';
import { loadBookingFacts } from '../mail/facts.ts';
import { refusalPage } from '../pages/answers.ts';
import { certificateForm, certificateUploadedPage } from '../pages/certificates.ts';

export interface HandoverRecordDeps {
  knex: Knex;
  config: Config;
  files: FilesService;
  now?: () => number;
}

function uploadOf(req: Request): Upload {
  if (!req.file) throw new BadRequestError('Choose a file to upload.', [{ field: 'file', message: 'is required' }]);
  return { buffer: req.file.buffer, originalName: req.file.originalname };
}

const STATUS = { tampered: 400, 'wrong-purpose': 400, expired: 410 } as const;

/**
 * The records a job is handed over with: the crew's commissioning record (the phone page), the
 * partner electrician's certificate (from Our slots or a certificate link) and the office's waiver.
 * Each id is looked up in the reader's scope before a body or file is read, so another firm's id is
 * 404 whatever is sent.
 */
export function handoverRecordRoutes(
  table: RouteTable,
  { knex, config, files, now = Date.now }: HandoverRecordDeps,
): void {
  const commissioning = new CommissioningService(knex, files);
  const certificates = new CertificatesService(knex, files, now);
  const links = new CertificateLinks(config.LINK_SECRET);
  const id = (req: Request) => parse(IdParams, req.params, 'params').id;
  const visibleJob = async (req: Request) => String((await findVisible(Job, req.actor!, id(req), undefined, 'job')).id);

  table
    .get('/api/jobs/:id/commissioning', 'jobs:read', async (req, res) => {
      res.json(await commissioning.get(req.actor!, id(req)));
    })
    .put('/api/jobs/:id/commissioning', 'bookings:progress', async (req, res) => {
      const jobId = await visibleJob(req);
      res.json(await commissioning.put(req.actor!, jobId, parse(PutCommissioning, req.body)));
    })
    .get('/api/jobs/:id/certificate', 'jobs:read', async (req, res) => {
      res.json(await certificates.get(req.actor!, id(req)));
    })
    .put('/api/jobs/:id/certificate-waiver', 'jobs:write', async (req, res) => {
      const jobId = await visibleJob(req);
      res.json(await certificates.waive(req.actor!, jobId, parse(PutCertificateWaiver, req.body)));
    })
    .post('/api/partner/slots/:id/certificate', 'bookings:answer', async (req, res) => {
      const slotId = id(req);
      await certificates.assertOwnSlot(req.actor!, slotId);
      await receiveFile(req, res);
      res.status(201).json(await certificates.uploadForSlot(req.actor!, slotId, uploadOf(req)));
    });

  // The certificate link: a page with the form, and the form's upload (no session; the signed link is the proof).
  async function claimsOf(req: Request, res: Response): Promise<CertificateClaims | null> {
    try {
      return await links.verify(String(req.params.token), new Date(now()));
    } catch (error) {
      if (!(error instanceof LinkError)) throw error;
      await knex('link_attempts').insert({
        reason: error.reason,
        path: '/answer/certificate/…',
        jti: null,
        ip: req.ip ?? null,
      });
      res.status(STATUS[error.reason]).type('html').send(refusalPage(error.reason, 'certificate'));
      return null;
    }
  }

  table.get('/answer/certificate/:token', 'public', async (req, res) => {
    res.set('Cache-Control', 'no-store');
    const claims = await claimsOf(req, res);
    if (!claims) return;
    const facts = await loadBookingFacts(knex, claims.bookingId);
    if (!facts || facts.resource.firmId !== claims.firmId) {
      res.status(410).type('html').send(refusalPage('gone'));
      return;
    }
    const current = (await certificates.forPartner(claims.firmId, [claims.bookingId])).get(claims.bookingId) ?? null;
    res.type('html').send(certificateForm(facts, req.originalUrl, current));
  });

  table.post('/answer/certificate/:token', 'public', async (req, res) => {
    res.set('Cache-Control', 'no-store');
    const claims = await claimsOf(req, res);
    if (!claims) return;
    const facts = await loadBookingFacts(knex, claims.bookingId);
    if (!facts) {
      res.status(410).type('html').send(refusalPage('gone'));
      return;
    }
    try {
      // Whose slot it is now is the service's check (NotFoundError below), made again under the booking's lock.
      await receiveFile(req, res);
      const saved = await certificates.uploadByLink(claims, uploadOf(req));
      req.log?.info({ bookingId: claims.bookingId }, 'certificate uploaded by link');
      res
        .status(201)
        .type('html')
        .send(certificateUploadedPage(facts, req.originalUrl, saved));
    } catch (error) {
      // A slot given to another firm or taken off meanwhile: the link is spent.
      if (error instanceof NotFoundError) {
        res.status(410).type('html').send(refusalPage('gone'));
        return;
      }
      // A person with a browser reads the refusal on the page, with the form to try again.
      if (!(error instanceof HttpError)) throw error;
      const current = (await certificates.forPartner(claims.firmId, [claims.bookingId])).get(claims.bookingId) ?? null;
      res
        .status(error.status)
        .type('html')
        .send(certificateForm(facts, req.originalUrl, current, error.detail ?? error.title));
    }
  });
}
