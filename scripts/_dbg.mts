import { ApiClient } from '../tests/support/client'
const c = new ApiClient('http://127.0.0.1:3401')
await c.post('/api/auth/sign-in', { email: 'priya.anand@example.com', password: 'pondside-demo-2026' })
const r = await c.get(`/api/fish/${process.argv[2]}/growth`)
console.log(r.status, r.body.points.length, JSON.stringify(r.body.markers), JSON.stringify(r.body.alerts).slice(0, 500))
console.log(JSON.stringify(r.body.points.slice(0, 3)))
