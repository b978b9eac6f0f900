import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { OrderDetail } from '#shared/types/stockroom'
import { DEMO, expectOk, signedIn, type Client } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { allSent, eventually, receivedMail } from '../support/services'

// Orders that arrive in parts, closing what will not come, and purchase requests a supplier can
// answer. Through the real server, database, mail queue and SMTP fake.

let coordinator: Client
const uid = randomUUID().slice(0, 8)
const today = new Date().toISOString().slice(0, 10)
const supplierA = `flasks-${uid}@supplier.example`
const supplierB = `salts-${uid}@supplier.example`
const INTERNAL = `Budget code CHEM-${uid}, do not tell the supplier`

beforeAll(async () => { coordinator = await signedIn(DEMO.coordinator) })
afterAll(closeTestDb)

/** A sent sheet: a reagent and a glassware line from supplier A, a reagent from supplier B. */
async function sentSheet(tag: string): Promise<OrderDetail & { ids: { hexane: number, salt: number } }> {
  const hexane = await expectOk(coordinator.post('/api/stockroom/reagents', {
    name: `test hexane ${uid}-${tag}`, physicalState: 'liquid', density: 0.659, containerSize: 500, unit: 'mL',
    supplierName: 'Flask and Co', supplierEmail: supplierA,
  }), 201)
  const salt = await expectOk(coordinator.post('/api/stockroom/reagents', {
    name: `test sodium sulfate ${uid}-${tag}`, physicalState: 'solid', containerSize: 1000, unit: 'g', supplierName: 'Salt Works', supplierEmail: supplierB,
  }), 201)
  const sheet = await expectOk(coordinator.post('/api/stockroom/orders', { title: `Parts ${uid} ${tag}` }), 201)
  await expectOk(coordinator.request(`/api/stockroom/orders/${sheet.id}`, { method: 'PATCH', json: {
    notes: 'Please quote by Friday.',
    internalNotes: INTERNAL,
    lines: [
      { reagentId: hexane.id, name: hexane.name, supplierName: 'Flask and Co', supplierEmail: supplierA, containers: 3, containerSize: 500, unit: 'mL' },
      { name: `Separatory funnel ${tag}`, supplierName: 'Flask and Co', supplierEmail: supplierA, containers: 1, containerSize: 1, unit: 'each' },
      { reagentId: salt.id, name: salt.name, supplierName: 'Salt Works', supplierEmail: supplierB, containers: 2, containerSize: 1000, unit: 'g', note: 'Anhydrous' },
    ],
  } }))
  const sent = await expectOk(coordinator.post(`/api/stockroom/orders/${sheet.id}/send`))
  expect(sent.status).toBe('sent')
  return { ...sent, ids: { hexane: hexane.id, salt: salt.id } }
}

const lineOf = (order: OrderDetail, name: RegExp) => order.lines.find((l) => name.test(l.name))!

describe('partial receiving', () => {
  it('a part delivery keeps the rest open; the order is received only when the rest comes', async () => {
    const order = await sentSheet('a')
    const hexane = lineOf(order, /hexane/)
    const funnel = lineOf(order, /funnel/)
    const salt = lineOf(order, /sulfate/)
    expect(order.lines.map((l) => [l.received, l.open])).toEqual([[0, 3], [0, 1], [0, 2]])

    const part = await expectOk(coordinator.post(`/api/stockroom/orders/${order.id}/receive`, {
      receivedOn: today,
      lines: [{ lineId: hexane.id, containers: 1, lotCode: 'H-1' }, { lineId: salt.id, containers: 2, lotCode: 'S-1' }],
    }))
    expect(part.status).toBe('sent')
    expect(part.partlyReceived).toBe(true)
    expect(part.lines.map((l) => [l.name === hexane.name ? 'hexane' : l.name === salt.name ? 'salt' : 'funnel', l.received, l.open]))
      .toEqual([['hexane', 1, 2], ['funnel', 0, 1], ['salt', 2, 0]])
    expect(part.lots.map((l) => [l.reagentId, l.quantity]).sort()).toEqual([[order.ids.hexane, 500], [order.ids.salt, 2000]].sort())
    const list = await expectOk(coordinator.get('/api/stockroom/orders'))
    expect(list.find((o) => o.id === order.id)).toMatchObject({ status: 'sent', partlyReceived: true })

    // More than is open is refused, naming the line; nothing is written.
    const over = await coordinator.post(`/api/stockroom/orders/${order.id}/receive`, { receivedOn: today, lines: [{ lineId: hexane.id, containers: 3 }] })
    expect(over.status).toBe(400)
    expect(over.refusal.statusMessage).toMatch(/^lines\.0\.containers: At most 2 still open/)
    const nothing = await coordinator.post(`/api/stockroom/orders/${order.id}/receive`, { receivedOn: today, lines: [{ lineId: hexane.id, containers: 0 }] })
    expect(nothing.status).toBe(400)

    const rest = await expectOk(coordinator.post(`/api/stockroom/orders/${order.id}/receive`, {
      receivedOn: today, lines: [{ lineId: hexane.id, containers: 2, lotCode: 'H-2' }, { lineId: funnel.id, containers: 1 }],
    }))
    expect(rest.status).toBe('received')
    expect(rest.partlyReceived).toBe(false)
    expect(rest.lines.map((l) => [l.received, l.open])).toEqual([[3, 0], [1, 0], [2, 0]])
    expect(rest.receipts).toHaveLength(4)
    // 3 × 500 mL of hexane in two lots; the funnel is not stock.
    const lots = await testDb().selectFrom('reagentLots').select(['quantity', 'lotCode']).where('reagentId', '=', order.ids.hexane).orderBy('lotCode').execute()
    expect(lots).toEqual([{ quantity: 500, lotCode: 'H-1' }, { quantity: 1000, lotCode: 'H-2' }])
    expect((await coordinator.post(`/api/stockroom/orders/${order.id}/receive`, { receivedOn: today, lines: [{ lineId: hexane.id, containers: 1 }] })).status).toBe(409)
  })

  it('the demo’s received sheet shows its delivery: every line received, the lot it made', async () => {
    const list = await expectOk(coordinator.get('/api/stockroom/orders'))
    const seeded = list.find((o) => o.title === 'Practical 1: sulfuryl chloride')!
    const detail = await expectOk(coordinator.get(`/api/stockroom/orders/${seeded.id}`))
    expect(detail.status).toBe('received')
    expect(detail.lines.map((l) => [l.received, l.open])).toEqual([[1, 0]])
    expect(detail.receipts).toHaveLength(1)
    expect(detail.receipts[0]!.receivedOn).toBe(detail.receivedOn)
  })

  it('the rest can be closed with a reason, which the order keeps', async () => {
    const order = await sentSheet('b')
    const hexane = lineOf(order, /hexane/)
    await expectOk(coordinator.post(`/api/stockroom/orders/${order.id}/receive`, { receivedOn: today, lines: [{ lineId: hexane.id, containers: 3 }] }))
    const noReason = await coordinator.post(`/api/stockroom/orders/${order.id}/close`, { reason: '  ' })
    expect(noReason.status).toBe(400)
    expect(noReason.refusal.statusMessage).toMatch(/^reason:/)
    expect((await expectOk(coordinator.get(`/api/stockroom/orders/${order.id}`))).status).toBe('sent')

    const closed = await expectOk(coordinator.post(`/api/stockroom/orders/${order.id}/close`, { reason: 'Salt discontinued; funnel bought elsewhere' }))
    expect(closed).toMatchObject({ status: 'received', closedReason: 'Salt discontinued; funnel bought elsewhere', closedBy: expect.any(String), receivedOn: today })
    expect(closed.lines.map((l) => [l.received, l.open])).toEqual([[3, 0], [0, 0], [0, 0]])
    const again = await expectOk(coordinator.get(`/api/stockroom/orders/${order.id}`))
    expect(again.closedReason).toBe('Salt discontinued; funnel bought elsewhere')
    expect((await coordinator.post(`/api/stockroom/orders/${order.id}/close`, { reason: 'twice' })).status).toBe(409)
    const audit = await testDb().selectFrom('auditLog').select(['action', 'after']).where('entity', '=', 'order_sheet')
      .where('entityId', '=', String(order.id)).where('action', '=', 'order.close').execute()
    expect(audit).toHaveLength(1)
    expect(JSON.stringify(audit[0]!.after)).toContain('discontinued')

    const draft = await expectOk(coordinator.post('/api/stockroom/orders', { title: `Draft ${uid}` }), 201)
    expect((await coordinator.post(`/api/stockroom/orders/${draft.id}/close`, { reason: 'not sent' })).status).toBe(409)
  })
})

describe('purchase requests', () => {
  it('reply to the coordinator, copy the coordinator, carry only their supplier\u2019s lines and no internal note', async () => {
    const order = await sentSheet('c')
    await allSent(`order:${order.id}:%`, 2)
    const mails = await eventually(async () => {
      const all = (await receivedMail()).filter((m) => m.subject === `Purchase request ${order.id}: ${order.title}`)
      return all.length === 2 && all
    })
    const to = (address: string) => mails.find((m) => (Array.isArray(m.to) ? m.to : [m.to]).some((t) => t?.text.includes(address)))!
    const a = to(supplierA)
    const b = to(supplierB)
    for (const mail of [a, b]) {
      expect(mail.replyTo?.text).toContain(DEMO.coordinator)
      const cc = Array.isArray(mail.cc) ? mail.cc : [mail.cc]
      expect(cc.map((c) => c?.text).join(' ')).toContain(DEMO.coordinator)
      const csv = mail.attachments[0]!.content.toString('utf8')
      for (const body of [mail.text ?? '', String(mail.html), csv]) {
        expect(body).not.toContain(INTERNAL)
        expect(body).not.toContain('CHEM-')
      }
      expect(mail.text).toContain('Please quote by Friday.')
    }
    expect(a.text).toContain('hexane')
    expect(a.text).toContain('Separatory funnel c')
    expect(a.text).not.toContain('sodium sulfate')
    expect(a.attachments[0]!.content.toString('utf8')).not.toContain('sodium sulfate')
    expect(b.text).toContain('sodium sulfate')
    expect(b.text).not.toContain('hexane')
    expect(b.text).not.toContain('funnel')
    expect(b.attachments[0]!.content.toString('utf8')).not.toMatch(/hexane|funnel/)

    // The sent page's record says to whom each went and that the message left.
    const detail = await expectOk(coordinator.get(`/api/stockroom/orders/${order.id}`))
    expect(detail.requests.map((r) => [r.supplierEmail, r.lineCount, r.status]).sort())
      .toEqual([[supplierA, 2, 'sent'], [supplierB, 1, 'sent']].sort())
    expect(detail.internalNotes).toBe(INTERNAL)
  })
})
