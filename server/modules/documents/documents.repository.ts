import type { Db } from '../../db/knex';

export type OwnerType = 'point' | 'gear' | 'fault' | 'inspection';

/** A stored file's record: what it belongs to, its checked type, and the random name it is kept under. */
export interface DocumentRecord {
  id: number;
  ownerType: OwnerType;
  ownerId: number;
  kind: string;
  originalName: string;
  storedName: string;
  mime: string;
  size: number;
  uploadedAt: string;
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

const toDocument = (r: DocRow): DocumentRecord => ({
  id: r.id,
  ownerType: r.owner_type,
  ownerId: r.owner_id,
  kind: r.kind,
  originalName: r.original_name,
  storedName: r.stored_name,
  mime: r.mime,
  size: r.size,
  uploadedAt: r.uploaded_at,
});

export function documentsRepository(db: Db) {
  return {
    async insert(d: { owner: { type: OwnerType; id: number }; kind: string; originalName: string; storedName: string; mime: string; size: number; uploadedBy: number }, at: Date, trx: Db): Promise<DocumentRecord> {
      const [row] = await trx('documents')
        .insert({ owner_type: d.owner.type, owner_id: d.owner.id, kind: d.kind, original_name: d.originalName, stored_name: d.storedName, mime: d.mime, size: d.size, uploaded_by: d.uploadedBy, uploaded_at: at.toISOString() })
        .returning('*');
      return toDocument(row as DocRow);
    },
    /** An owner's documents, newest upload first. */
    async forOwner(owner: { type: OwnerType; id: number }, trx: Db = db): Promise<DocumentRecord[]> {
      return (await trx<DocRow>('documents').where({ owner_type: owner.type, owner_id: owner.id }).orderBy('uploaded_at', 'desc')).map(toDocument);
    },
    async byId(id: number, trx: Db = db): Promise<DocumentRecord | null> {
      const row = await trx<DocRow>('documents').where({ id }).first();
      return row ? toDocument(row) : null;
    },
  };
}
export type DocumentsRepository = ReturnType<typeof documentsRepository>;
