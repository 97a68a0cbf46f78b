// When scripts/cluster.mjs runs one server process per core, a cap meant for the machine (photos decoded
// at once, spreadsheet parser threads) is split between the processes, at least one each.
// Explicit imports only: the photo benchmark loads the pipeline outside Nitro.
export function perProcessShare(machineTotal: number) {
  const processes = Math.max(1, Number(process.env.FINTRAIL_WORKER_COUNT) || 1)
  return Math.max(1, Math.floor(machineTotal / processes))
}
