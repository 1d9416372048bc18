/**
 * The multipart-upload calls s3rver 3 lacks, answered in front of its own routes: ListParts, AbortMultipartUpload
 * and ListMultipartUploads (resumable uploads on the bucket need all three). They read and remove what s3rver's
 * own InitiateMultipartUpload and UploadPart wrote in its folder: `<bucket>/._S3rver_uploads/<uploadId>/` holds
 * `key`, one file per part (`1`, `2`, ...) and its `.md5`. Path-style requests only, as the fake is started.
 */
import { readFile, readdir, rm, stat } from 'node:fs/promises';
import { join } from 'node:path';

/** The part of Koa's context these calls use. */
interface FakeContext {
  method: string;
  path: string;
  query: Record<string, string | string[] | undefined>;
  status: number;
  body: unknown;
  type: string;
}

export interface FakeMultipartUpload {
  key: string;
  uploadId: string;
  initiated: Date;
}

function xml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

function answer(ctx: FakeContext, status: number, body: string): void {
  ctx.status = status;
  ctx.type = 'application/xml';
  ctx.body = `<?xml version="1.0" encoding="UTF-8"?>\n${body}`;
}

function noSuchUpload(ctx: FakeContext, uploadId: string): void {
  answer(ctx, 404, `<Error><Code>NoSuchUpload</Code><Message>The specified upload does not exist.</Message><UploadId>${xml(uploadId)}</UploadId></Error>`);
}

const uploadsFolder = (directory: string, bucket: string) => join(directory, bucket, '._S3rver_uploads');

/** The multipart uploads in progress in a bucket of the fake, sorted by key. */
export async function fakeMultipartUploads(directory: string, bucket: string): Promise<FakeMultipartUpload[]> {
  const folder = uploadsFolder(directory, bucket);
  const ids = await readdir(folder).catch(() => [] as string[]);
  const out: FakeMultipartUpload[] = [];
  for (const uploadId of ids) {
    try {
      const keyFile = join(folder, uploadId, 'key');
      out.push({ key: await readFile(keyFile, 'utf8'), uploadId, initiated: (await stat(keyFile)).mtime });
    } catch {
      // Completed or aborted meanwhile.
    }
  }
  return out.sort((a, b) => a.key.localeCompare(b.key) || a.uploadId.localeCompare(b.uploadId));
}

async function listParts(ctx: FakeContext, folder: string, bucket: string, key: string, uploadId: string): Promise<void> {
  const dir = join(folder, uploadId);
  let names: string[];
  try {
    names = await readdir(dir);
  } catch {
    noSuchUpload(ctx, uploadId);
    return;
  }
  const numbers = names.filter((name) => /^\d+$/.test(name)).map(Number).sort((a, b) => a - b);
  const parts: string[] = [];
  for (const number of numbers) {
    const [info, md5] = await Promise.all([stat(join(dir, String(number))), readFile(join(dir, `${number}.md5`), 'utf8').catch(() => '')]);
    parts.push(`<Part><PartNumber>${number}</PartNumber><LastModified>${info.mtime.toISOString()}</LastModified><ETag>"${md5}"</ETag><Size>${info.size}</Size></Part>`);
  }
  answer(
    ctx,
    200,
    `<ListPartsResult><Bucket>${xml(bucket)}</Bucket><Key>${xml(key)}</Key><UploadId>${xml(uploadId)}</UploadId><MaxParts>10000</MaxParts><IsTruncated>false</IsTruncated>${parts.join('')}</ListPartsResult>`,
  );
}

/** Koa middleware answering the three calls; every other request goes on to s3rver. */
export function multipartCalls(directory: string) {
  return async (ctx: FakeContext, next: () => Promise<void>): Promise<void> => {
    const [bucket, ...rest] = ctx.path.split('/').slice(1).map((part) => decodeURIComponent(part));
    const key = rest.join('/');
    const uploadId = typeof ctx.query.uploadId === 'string' ? ctx.query.uploadId : null;
    if (!bucket) return next();
    const folder = uploadsFolder(directory, bucket);
    if (key && uploadId && ctx.method === 'GET') return listParts(ctx, folder, bucket, key, uploadId);
    if (key && uploadId && ctx.method === 'DELETE') {
      if (!/^[0-9a-f]+$/.test(uploadId) || !(await stat(join(folder, uploadId)).catch(() => null))) return noSuchUpload(ctx, uploadId);
      await rm(join(folder, uploadId), { recursive: true, force: true });
      ctx.status = 204;
      ctx.body = null;
      return;
    }
    if (!key && 'uploads' in ctx.query && ctx.method === 'GET') {
      const prefix = typeof ctx.query.prefix === 'string' ? ctx.query.prefix : '';
      const uploads = (await fakeMultipartUploads(directory, bucket)).filter((u) => u.key.startsWith(prefix));
      const rows = uploads.map((u) => `<Upload><Key>${xml(u.key)}</Key><UploadId>${u.uploadId}</UploadId><Initiated>${u.initiated.toISOString()}</Initiated></Upload>`);
      answer(ctx, 200, `<ListMultipartUploadsResult><Bucket>${xml(bucket)}</Bucket><Prefix>${xml(prefix)}</Prefix><MaxUploads>1000</MaxUploads><IsTruncated>false</IsTruncated>${rows.join('')}</ListMultipartUploadsResult>`);
      return;
    }
    return next();
  };
}
