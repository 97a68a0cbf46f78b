// The least a route can cost here: a bare node:http server (no framework, no middleware, no log line) whose one
// route runs the statement it is given (BARE_STATEMENT: { name, text, values }) and answers its first row as JSON.
// `pond-side` starts it beside the built server, so the profile API's time can be read against this floor.
import http from 'node:http'
import pg from 'pg'

const statement = JSON.parse(process.env.BARE_STATEMENT ?? '{}')
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 })
const server = http.createServer(async (_request, response) => {
  const { rows } = await pool.query(statement)
  const body = JSON.stringify(rows[0] ?? null)
  response.writeHead(200, { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) })
  response.end(body)
})
server.listen(Number(process.env.PORT), '127.0.0.1', () => console.log('listening'))
process.on('SIGTERM', () => server.close(() => pool.end().then(() => process.exit(0))))
