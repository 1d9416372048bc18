/**
 * Resumable video uploads of a session, over the tus protocol 1.0 (`@tus/server`):
 * `POST …/clips/uploads` starts one (Upload-Length, Upload-Metadata with `filename` and the clip fields),
 * `HEAD …/clips/uploads/:uploadId` tells how many bytes arrived, `PATCH` sends the next bytes from there, and
 * the PATCH that brings the last byte answers 201 with the new clip and its processing job, as a multipart
 * upload does (a HEAD after it answers "complete" with the clip's and job's ids in `Arcwright-Clip-Id` and
 * `Arcwright-Job-Id`, for a client that lost that answer). `DELETE` abandons one. The same session, club-scope, role and CSRF checks as every write run
 * before the protocol; each upload belongs to the member who started it.
 */
import { Router, type Request, type Response } from 'express';
import { ERRORS, Metadata, Server, Uid, type Upload } from '@tus/server';
import { NodeRequest } from 'srvx/node';
import { config } from '../config';
import { discardBody } from '../http/discard-body';
import { ApiError, parseId } from '../http/errors';
import { clubAccess, clubOf } from '../middleware/authorize';
import { validationError } from '../middleware/validate';
import { log } from '../logger';
import { addressId, checkUploadCreation, checkUploadHead, expiredUpload, finishUpload, findOwnReceipt, findOwnUpload, metadataFields, uploadArea } from '../services/clip-uploads';
import { tooLarge } from '../services/clips';
import { uploadLocker } from '../services/upload-locks';

const UPLOADS = '/clubs/:clubId/sessions/:sessionId/clips/uploads';
const TUS_VERSION = '1.0.0';

type TusRequest = Parameters<NonNullable<ConstructorParameters<typeof Server>[0]['onUploadFinish']>>[0];

/** The Express request behind the protocol library's request (the same Node request object). */
function expressRequest(req: TusRequest): Request {
  const node = req.runtime?.node?.req as Request | undefined;
  if (!node) throw new Error('The upload request did not come through Node’s HTTP server.');
  return node;
}

/** A refusal in the shape the protocol library answers with; its body is the API's error JSON. */
function protocolError(err: ApiError): { status_code: number; body: string } {
  return { status_code: err.status, body: JSON.stringify({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } }) };
}

/** The protocol library's own refusals, in the API's words. */
function fromProtocolError(status: number, body: string): ApiError {
  if (body === ERRORS.INVALID_OFFSET.body) {
    return new ApiError('CONFLICT', 'This part does not start where the upload stands: ask for the offset (HEAD) and send the rest from there.');
  }
  if (body === ERRORS.ERR_MAX_SIZE_EXCEEDED.body || body === ERRORS.ERR_SIZE_EXCEEDED.body) return tooLarge(config.uploads.maxBytes);
  if (body === ERRORS.ERR_LOCK_TIMEOUT.body) {
    return new ApiError('UPLOAD_BUSY', 'Another request is sending a part of this upload right now. Ask for the offset (HEAD) in a moment and send the rest from there.');
  }
  if (status === 404) return new ApiError('NOT_FOUND', 'No such upload here. Start the upload again.');
  if (status === 410) return expiredUpload();
  if (status >= 500 && status !== 501) {
    return new ApiError('INTERNAL', 'The upload could not be written on our side. Try again in a moment; it resumes where it stopped.');
  }
  return new ApiError('BAD_REQUEST', `The upload request was refused: ${body.trim()} Use a client of the tus protocol ${TUS_VERSION}, as the upload page does.`);
}

let tus: { area: unknown; server: Server } | null = null;

async function tusServer(): Promise<Server> {
  const area = await uploadArea();
  if (tus?.area === area) return tus.server;
  const server = new Server({
    path: '/api/v1/clubs/uploads',
    datastore: area.store,
    // Shared by every web process: the next part of an upload may come through any of them.
    locker: uploadLocker(),
    maxSize: () => config.uploads.maxBytes,
    // Same origin only: no CORS headers.
    allowedOrigins: () => false,
    // The address of an upload is the creation address plus its id (relative; clients resolve it).
    generateUrl: (req, { id }) => `${expressRequest(req).originalUrl.split('?')[0]!.replace(/\/+$/, '')}/${addressId(id)}`,
    // The store's id of an upload may differ from the one in its address (a bucket keeps it under a folder).
    namingFunction: () => area.storeId(Uid.rand()),
    getFileIdFromRequest: (_req, lastPath) => (lastPath ? area.storeId(lastPath) : lastPath),
    onUploadCreate: async (req) => ({ metadata: creationMetadata.get(expressRequest(req)) }),
    onUploadFinish: async (req, upload: Upload) => {
      const express = expressRequest(req);
      try {
        const result = await finishUpload(clubOf(express), parseId(express.params.sessionId, 'session'), upload);
        return { status_code: 201, headers: { 'Content-Type': 'application/json; charset=utf-8' }, body: JSON.stringify({ data: result }) };
      } catch (err) {
        if (err instanceof ApiError) throw protocolError(err);
        log.error(`${express.method} ${express.originalUrl} failed`, { requestId: express.requestId, stack: err instanceof Error ? err.stack : String(err) });
        throw protocolError(
          new ApiError('INTERNAL', `Something went wrong on our side (reference ${express.requestId}). Try again in a moment; if it keeps happening, give this reference to your administrator.`),
        );
      }
    },
    onResponseError: (req, err) => {
      const status = 'status_code' in err ? err.status_code : 500;
      const body = 'body' in err && typeof err.body === 'string' ? err.body : '';
      if (body.startsWith('{"error"')) return { status_code: status, body };
      if (status >= 500) {
        const express = expressRequest(req);
        log.error(`${express.method} ${express.originalUrl} failed in the upload protocol`, { requestId: express.requestId, stack: err instanceof Error ? err.stack : body });
      }
      return protocolError(fromProtocolError(status, body));
    },
  });
  tus = { area, server };
  return server;
}

/** Metadata the server decided for an upload being created, handed to the protocol library's creation hook. */
const creationMetadata = new WeakMap<Request, Record<string, string>>();

/**
 * Runs the protocol on a request that passed the checks and sends its answer; every body it answers with is the
 * API's JSON. Note: the answer is written through Express, not srvx's sendNodeResponse, whose `res.end(callback)`
 * express-session's wrapped `end` takes for a chunk (and the connection is then reset).
 */
async function runProtocol(req: Request, res: Response): Promise<void> {
  const server = await tusServer();
  const response = await server.handleWeb(new NodeRequest({ req, res }));
  const body = response.body ? Buffer.from(await response.arrayBuffer()) : null;
  // A part refused before its bytes were read (a wrong offset): read them, so that the client gets the answer.
  if (response.status >= 400) await discardBody(req, res);
  res.status(response.status);
  for (const [name, value] of response.headers) {
    if (name !== 'content-type' && name !== 'content-length') res.setHeader(name, value);
  }
  if (body && body.length > 0) res.type('application/json').send(body);
  else res.end();
}

function requireProtocol(req: Request): void {
  if (req.headers['tus-resumable'] !== TUS_VERSION) {
    throw new ApiError('BAD_REQUEST', `Send the header Tus-Resumable: ${TUS_VERSION}; this address speaks the tus resumable-upload protocol ${TUS_VERSION}.`);
  }
}

/** Runs the checks of a request that carries bytes; a refused one has its body read and dropped first. */
async function refusingBody(req: Request, res: Response, check: () => Promise<void>): Promise<void> {
  try {
    await check();
  } catch (err) {
    await discardBody(req, res);
    throw err;
  }
}

async function ownUpload(req: Request): Promise<Upload> {
  return findOwnUpload(clubOf(req), req.user!.id, parseId(req.params.sessionId, 'session'), String(req.params.uploadId));
}

export const clipUploadsRouter = Router();

clipUploadsRouter.post(UPLOADS, clubAccess('admin', 'coach'), async (req, res) => {
  await refusingBody(req, res, async () => {
    requireProtocol(req);
    let metadata: Record<string, string | null> = {};
    const raw = req.headers['upload-metadata'];
    if (typeof raw === 'string' && raw !== '') {
      try {
        metadata = Metadata.parse(raw);
      } catch {
        throw new ApiError('BAD_REQUEST', 'Upload-Metadata is not valid: send comma-separated pairs of a key and its value in base64.');
      }
    }
    const fields = metadataFields(metadata);
    if (!fields.success) throw validationError(fields.error);
    const length = req.headers['upload-length'];
    const stored = await checkUploadCreation(
      clubOf(req),
      req.user!.id,
      parseId(req.params.sessionId, 'session'),
      {
        length: typeof length === 'string' ? length : null,
        deferLength: req.headers['upload-defer-length'] !== undefined,
        carriesBytes: Number(req.headers['content-length'] ?? 0) > 0 || req.headers['transfer-encoding'] !== undefined,
        metadata,
      },
      fields.data,
    );
    creationMetadata.set(req, stored);
  });
  await runProtocol(req, res);
});

clipUploadsRouter.head(`${UPLOADS}/:uploadId`, clubAccess('admin', 'coach'), async (req, res) => {
  requireProtocol(req);
  const receipt = await findOwnReceipt(clubOf(req), req.user!.id, parseId(req.params.sessionId, 'session'), String(req.params.uploadId));
  if (receipt) {
    // A finished upload whose answer may have been lost: complete, and here is its clip (423 while it is being kept).
    if (receipt.clipId === null) throw new ApiError('UPLOAD_BUSY', 'This upload is being checked and kept right now. Ask again in a moment.');
    res.set({
      'Tus-Resumable': TUS_VERSION,
      'Cache-Control': 'no-store',
      'Upload-Offset': String(receipt.sizeBytes),
      'Upload-Length': String(receipt.sizeBytes),
      'Arcwright-Clip-Id': String(receipt.clipId),
      'Arcwright-Job-Id': String(receipt.jobId),
      'Access-Control-Expose-Headers': 'Upload-Offset, Upload-Length, Tus-Resumable, Arcwright-Clip-Id, Arcwright-Job-Id',
    });
    res.status(200).end();
    return;
  }
  await ownUpload(req);
  await runProtocol(req, res);
});

clipUploadsRouter.patch(`${UPLOADS}/:uploadId`, clubAccess('admin', 'coach'), async (req, res) => {
  await refusingBody(req, res, async () => {
    requireProtocol(req);
    await checkUploadHead(await ownUpload(req));
  });
  await runProtocol(req, res);
});

clipUploadsRouter.delete(`${UPLOADS}/:uploadId`, clubAccess('admin', 'coach'), async (req, res) => {
  requireProtocol(req);
  await ownUpload(req);
  await runProtocol(req, res);
});
