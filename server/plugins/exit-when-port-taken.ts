// Nitro's node server starts listening after the plugins and has no 'error' listener, so a port already taken
// (or not allowed) arrives as an uncaught exception, which Nitro only logs: the process then stayed up with no
// port, running background jobs, and a script waiting for it saw whatever else answered on that port.
export default defineNitroPlugin(() => {
  process.on('uncaughtException', (error: NodeJS.ErrnoException) => {
    // 'bind' where a cluster worker's listen came back refused from the primary (scripts/cluster.mjs).
    if (error?.syscall !== 'listen' && error?.syscall !== 'bind') return
    const where = 'port' in error ? `port ${String((error as { port?: number }).port)}` : 'its address'
    const why = error.code === 'EADDRINUSE' ? `${where} is in use by another program` : `it may not listen on ${where} (${error.code})`
    logger.fatal(`The server cannot start: ${why}. Stop the other program or choose another PORT.`)
    process.exit(1)
  })
})
