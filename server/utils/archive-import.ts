import { randomBytes, randomUUID } from 'node:crypto'
import { eq, sql } from 'drizzle-orm'
import type { DataFile } from '#shared/utils/archive-schema'
import { archiveRecords, type OpenedArchive, type RecordOf } from '../workers/archive-read'
import { entryStream } from '../workers/zip-reader'
import { upgradeLegacyEntries } from '../db/upgrade-entries'
import { originalKey } from '../storage/file-storage'

const BATCH = 500

/** Old archive id → new id, made on first sight so references may point forward in a file. */
class IdMap {
  private map = new Map<string, string>()
  get(old: string) {
    let id = this.map.get(old)
    if (!id) this.map.set(old, (id = randomUUID()))
    return id
  }

  maybe(old: string | null) {
    return old === null ? null : this.get(old)
  }
}

/** The records of one data file, which the upload worker has already checked whole. */
async function* records<F extends DataFile>(archive: OpenedArchive, file: F): AsyncGenerator<RecordOf<F>> {
  for await (const read of archiveRecords(archive, file)) {
    if (read.problems) throw archiveRefused(`${read.problems[0]!.file} changed while it was being imported`)
    yield read.record
  }
}

async function inBatches<T>(records: AsyncIterable<T>, write: (batch: T[]) => Promise<unknown>) {
  let batch: T[] = []
  for await (const record of records) {
    batch.push(record)
    if (batch.length >= BATCH) {
      await write(batch)
      batch = []
    }
  }
  if (batch.length) await write(batch)
}

/**
 * Writes a validated archive as a new pond owned by the importer, in one transaction: fish, profile
 * changes and every timeline entry keep their original dates, and their authors as the archive names them
 * (name, role then, e-mail) in `archive_people`, tied to this import (who imported it, when the archive was
 * made). No account is looked up or created: an entry read in is never shown as written by a local person.
 * Photo originals are copied first and removed again if the transaction fails; their sizes are made by jobs after the commit.
 */
export async function importArchive(archive: OpenedArchive, importerId: string) {
  const fishIds = new IdMap()
  const photoIds = new IdMap()
  const entryIds = new IdMap()
  const people = new Map<string, string>()
  const copied: string[] = []
  try {
    const pondId = await useDb().transaction(async (tx) => {
      await tx.execute(sql`select set_config('fintrail.bulk_measurements', 'on', true)`)
      const { pond } = archive.manifest
      const [created] = await tx.insert(schema.ponds).values({ name: pond.name, volumeLitres: pond.volumeLitres, notes: pond.notes }).returning({ id: schema.ponds.id })
      const newPondId = created!.id
      await tx.insert(schema.memberships).values({ pondId: newPondId, userId: importerId, role: 'owner' })
      const [pondImport] = await tx.insert(schema.pondImports).values({
        pondId: newPondId, importedById: importerId, exportedAt: new Date(archive.manifest.exportedAt), sourcePondName: pond.name,
      }).returning({ id: schema.pondImports.id })
      await inBatches(records(archive, 'people'), batch => tx.insert(schema.archivePeople).values(batch.map((person) => {
        const id = randomUUID()
        people.set(person.ref, id)
        return { id, importId: pondImport!.id, name: person.name, role: person.role, email: person.email?.toLowerCase() ?? null }
      })))
      const author = (ref: string) => people.get(ref)!

      await inBatches(records(archive, 'fish'), batch => tx.insert(schema.fish).values(batch.map(f => ({
        id: fishIds.get(f.id), pondId: newPondId, name: f.name, species: f.species, scientificName: f.scientificName, variety: f.variety, sex: f.sex,
        hatchYear: f.hatchYear, hatchYearEstimated: f.hatchYearEstimated, acquiredOn: f.acquiredOn, acquiredFrom: f.acquiredFrom,
        microchip: f.microchip, features: f.features, status: f.status, createdAt: new Date(f.createdAt), updatedAt: new Date(f.updatedAt),
      })))).catch((error) => {
        throw conflictFromUniqueViolation(error) ? archiveRefused('a living fish in the archive has a microchip number that a living fish here already has', 409) : error
      })

      for await (const photo of records(archive, 'photos')) {
        const id = photoIds.get(photo.id)
        const target = originalKey(id)
        copied.push(target)
        // Whole, then stored: an archive's photo is at most an upload's size.
        const chunks: Buffer[] = []
        for await (const chunk of await entryStream(archive.zip, archive.byName.get(photo.file)!)) chunks.push(chunk as Buffer)
        await useFileStorage().put(target, Buffer.concat(chunks))
        const uploadId = randomBytes(16).toString('hex')
        await tx.insert(schema.photos).values({
          id, fishId: fishIds.get(photo.fishId), importedUploaderId: author(photo.uploader), uploadId, originalName: photo.originalName, view: photo.view,
          caption: photo.caption, takenAt: photo.takenAt ? new Date(photo.takenAt) : null, state: 'pending', mime: photo.mime, bytes: photo.bytes,
          sha256: photo.sha256, createdAt: new Date(photo.createdAt),
        })
        // Its sizes are made by a job that exists exactly when the import commits; any instance may run it.
        await queuePhotoDerivation(id, tx)
      }
      for await (const f of records(archive, 'fish')) {
        if (f.profilePhotoId) await tx.update(schema.fish).set({ profilePhotoId: photoIds.get(f.profilePhotoId) }).where(sql`${schema.fish.id} = ${fishIds.get(f.id)}`)
      }

      await inBatches(records(archive, 'fish-edits'), batch => tx.insert(schema.fishEdits).values(batch.map(e => ({
        fishId: fishIds.get(e.fishId), importedAuthorId: author(e.by), changes: e.changes, createdAt: new Date(e.createdAt),
      }))))

      // Entries go in the way the app writes them, so the record's guards (drizzle/0004) hold for imports too:
      // revision 1 first, then each amendment on top of its revision row, then "entered in error".
      await inBatches(records(archive, 'timeline'), async (batch) => {
        await tx.insert(schema.timelineEntries).values(batch.map(e => ({
          id: entryIds.get(e.id), fishId: fishIds.get(e.fishId), pondId: newPondId, kind: e.kind, occurredAt: new Date(e.revisions[0]!.occurredAt), importedAuthorId: author(e.author),
          relatedFishId: fishIds.maybe(e.relatedFishId), linkedEntryId: entryIds.maybe(e.linkedEntryId), photoId: photoIds.maybe(e.photoId),
          data: e.revisions[0]!.data, revision: 1, createdAt: new Date(e.createdAt),
        })))
        await tx.insert(schema.timelineRevisions).values(batch.flatMap(e => e.revisions.map(r => ({
          entryId: entryIds.get(e.id), revision: r.revision, occurredAt: new Date(r.occurredAt), data: r.data, importedAuthorId: author(r.author), reason: r.reason, createdAt: new Date(r.createdAt),
        }))))
        for (const e of batch) {
          const where = eq(schema.timelineEntries.id, entryIds.get(e.id))
          for (const r of e.revisions.slice(1)) {
            await tx.update(schema.timelineEntries).set({ revision: r.revision, data: r.data, occurredAt: new Date(r.occurredAt) }).where(where)
          }
          if (e.doses?.length) {
            await tx.insert(schema.treatmentDoses).values(e.doses.map(d => ({
              entryId: entryIds.get(e.id), doseNumber: d.doseNumber, givenAt: new Date(d.givenAt), importedGivenById: author(d.givenBy), note: d.note, createdAt: new Date(d.createdAt),
            })))
          }
          if (e.enteredInError) {
            await tx.update(schema.timelineEntries).set({ enteredInError: true, errorReason: e.errorReason, importedErrorById: e.errorBy ? author(e.errorBy) : null, errorAt: e.errorAt ? new Date(e.errorAt) : null }).where(where)
          }
        }
      })
      // An archive made before procedure codes (and the other later forms) reads like a live write now.
      await upgradeLegacyEntries(tx, sql`e.pond_id = ${newPondId}`)
      await tx.execute(sql`select set_config('fintrail.bulk_measurements', 'off', true)`)
      await tx.execute(sql`select fintrail_refresh_measurement_summary(id) from fish where pond_id = ${newPondId}`)
      return newPondId
    })
    if (copied.length) wakeWorkers(PHOTO_DERIVE_JOB)
    return pondId
  }
  catch (error) {
    await Promise.all(copied.map(key => useFileStorage().remove(key).catch(() => undefined)))
    throw error
  }
}
