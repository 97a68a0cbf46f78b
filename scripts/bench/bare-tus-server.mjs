// @tus/server with @tus/file-store as our upload route uses them, behind plain node:http: no Nitro, no session,
// no lock in PostgreSQL, no photo check. `photos` runs it in a process of its own, as the built server runs,
// so neither shares the benchmark's event loop with the tus client. PORT and TUS_DIR say where.
import http from 'node:http'
import { FileStore } from '@tus/file-store'
import { Server } from '@tus/server'

const tus = new Server({ path: '/files', datastore: new FileStore({ directory: process.env.TUS_DIR }) })
const server = http.createServer((request, response) => tus.handle(request, response))
server.listen(Number(process.env.PORT), '127.0.0.1', () => console.log('listening'))
process.on('SIGTERM', () => server.close(() => process.exit(0)))
