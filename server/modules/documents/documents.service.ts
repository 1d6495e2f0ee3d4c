import { randomUUID } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { rm, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import multer from 'multer';
import { fileTypeFromBuffer } from 'file-type';
import type { Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { HttpError, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';

export const MAX_UPLOAD_BYTES = 10 * 1024 * 1024;
export const MAX_FILES = 6;
const ALLOWED: Record<string, string> = { 'application/pdf': 'pdf', 'image/jpeg': 'jpg', 'image/png': 'png' };

export type OwnerType = 'point' | 'gear' | 'fault' | 'inspection';

/** Multipart parsing held in memory (bounded), so nothing reaches the disk before its bytes are checked. */
export function uploadMiddleware(field: string, maxCount = 1) {
  return multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_UPLOAD_BYTES, files: maxCount, fields: 20, fieldSize: 64 * 1024 } }).array(field, maxCount);
}

interface DocRow {
  id: number;
  owner_type: OwnerType;
  owner_id: number;
  kind: string;
  original_name: string;
  stored_name: string;
  mime: string;
  size: number;
  uploaded_at: string;
}

const toWire = (r: DocRow) => ({
  id: r.id,
  ownerType: r.owner_type,
  ownerId: r.owner_id,
  kind: r.kind,
  originalName: r.original_name,
  mime: r.mime,
  size: r.size,
  uploadedAt: r.uploaded_at,
  url: `/api/documents/${r.id}/file`,
});

/** A display name with no path and no control characters. */
function cleanName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? 'file';
  // eslint-disable-next-line no-control-regex
  return base.replace(/[\u0000-\u001f\u007f"<>]/g, '').slice(0, 150) || 'file';
}

export function documentsService(deps: { db: Db; clock: Clock; uploadDir: string; audit: AuditRepository }) {
  const { db, clock, uploadDir } = deps;
  mkdirSync(uploadDir, { recursive: true });

  /** Checks every file's type from its bytes first; only then writes them, under random names. */
  async function checkFiles(files: Express.Multer.File[]) {
    const checked: Array<{ file: Express.Multer.File; mime: string; ext: string }> = [];
    for (const file of files) {
      if (file.size === 0) throw new HttpError(400, 'empty_file', `“${cleanName(file.originalname)}” is empty.`);
      const type = await fileTypeFromBuffer(file.buffer);
      if (!type || !ALLOWED[type.mime]) throw new HttpError(415, 'unsupported_file_type', `“${cleanName(file.originalname)}” is not a PDF, JPEG or PNG file.`);
      checked.push({ file, mime: type.mime, ext: ALLOWED[type.mime] });
    }
    return checked;
  }

  return {
    checkFiles,
    /** Stores files for an owner inside `trx`; files written are removed again if the transaction fails. */
    async store(trx: Db, owner: { type: OwnerType; id: number }, files: Express.Multer.File[], kind: string, actorId: number) {
      const checked = await checkFiles(files);
      const written: string[] = [];
      try {
        const out = [];
        for (const c of checked) {
          const stored = `${randomUUID()}.${c.ext}`;
          await writeFile(join(uploadDir, stored), c.file.buffer, { flag: 'wx', mode: 0o600 });
          written.push(stored);
          const [row] = await trx('documents')
            .insert({ owner_type: owner.type, owner_id: owner.id, kind, original_name: cleanName(c.file.originalname), stored_name: stored, mime: c.mime, size: c.file.size, uploaded_by: actorId, uploaded_at: clock.now().toISOString() })
            .returning('*');
          out.push(toWire(row as DocRow));
          const doc = row as DocRow;
          await deps.audit.record(trx, { actorId, action: 'document.added', entity: 'document', entityId: doc.id, after: { ownerType: owner.type, ownerId: owner.id, kind, name: doc.original_name, mime: doc.mime, size: doc.size } }, clock.now());
        }
        return out;
      } catch (err) {
        await Promise.all(written.map((n) => rm(join(uploadDir, n), { force: true })));
        throw err;
      }
    },
    async list(owner: { type: OwnerType; id: number }) {
      return (await db<DocRow>('documents').where({ owner_type: owner.type, owner_id: owner.id }).orderBy('uploaded_at', 'desc')).map(toWire);
    },
    async file(id: number) {
      const row = await db<DocRow>('documents').where({ id }).first();
      if (!row) throw notFound('That document');
      return { path: join(uploadDir, row.stored_name), mime: row.mime, name: row.original_name };
    },
  };
}
export type DocumentsService = ReturnType<typeof documentsService>;
