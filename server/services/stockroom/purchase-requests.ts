import { formatContainers, type OrderDetail, type OrderLineView } from '#shared/types/stockroom'
import { escapeHtml } from '../../utils/html'
import { invalid } from '../../utils/validation'
import { createError } from 'h3'
import { orderSheetCsv } from './orders'

// The purchase requests of a sheet: one per supplier e-mail, as plain text, HTML and a CSV.

export interface PurchaseRequest {
  supplierEmail: string
  supplierName: string
  lines: OrderLineView[]
}

/** Lines by supplier e-mail; a line without one cannot be requested (422 naming the line). */
export function purchaseRequests(detail: OrderDetail): PurchaseRequest[] {
  if (!detail.lines.length) throw createError({ statusCode: 422, statusMessage: 'The sheet has no lines to request' })
  const missing = detail.lines.findIndex((l) => !l.supplierEmail)
  if (missing >= 0) {
    const message = `Line ${missing + 1} (${detail.lines[missing]!.name}) has no supplier e-mail`
    invalid([{ field: `lines.${missing}.supplierEmail`, message }], 422)
  }
  const groups = new Map<string, PurchaseRequest>()
  for (const line of detail.lines) {
    const group = groups.get(line.supplierEmail!) ?? { supplierEmail: line.supplierEmail!, supplierName: line.supplierName, lines: [] }
    group.lines.push(line)
    groups.set(line.supplierEmail!, group)
  }
  return [...groups.values()]
}

/**
 * The e-mail of one purchase request: plain text, escaped HTML, the supplier's lines as CSV. Only
 * this supplier's lines and the notes meant for suppliers; the sheet's internal notes never.
 */
export function purchaseRequestMail(detail: OrderDetail, request: PurchaseRequest, sender: { name: string, email: string }) {
  const greeting = request.supplierName ? `Dear ${request.supplierName},` : 'Hello,'
  const rows = request.lines.map((l) => ({
    name: l.name,
    catalog: l.catalogNumber,
    amount: l.unit === 'each' ? `${l.containers} × ${l.containerSize} each` : formatContainers(l.containers, l.containerSize, l.unit),
    note: l.note,
  }))
  const deliver = detail.deliverTo ? `Deliver to: ${detail.deliverTo}` : ''
  const text = [
    greeting, '',
    `Please quote and supply the following (purchase request ${detail.id}, "${detail.title}"):`, '',
    ...rows.map((r, i) => `${i + 1}. ${r.name}${r.catalog ? ` [${r.catalog}]` : ''}: ${r.amount}${r.note ? ` (${r.note})` : ''}`),
    '', deliver, detail.notes, '',
    'The same list is attached as a CSV file.',
    `To answer, reply to this message: it goes to ${sender.name} <${sender.email}>.`, '',
    `${sender.name}, stockroom`,
  ].filter((line, i, all) => line !== '' || all[i - 1] !== '').join('\n')
  const cell = (value: string) => `<td style="padding:4px 8px;border:1px solid #ccc">${escapeHtml(value)}</td>`
  const html = [
    `<p>${escapeHtml(greeting)}</p>`,
    `<p>Please quote and supply the following (purchase request ${detail.id}, &ldquo;${escapeHtml(detail.title)}&rdquo;):</p>`,
    '<table style="border-collapse:collapse">',
    '<thead><tr><th>Item</th><th>Catalogue number</th><th>Amount</th><th>Note</th></tr></thead><tbody>',
    ...rows.map((r) => `<tr>${cell(r.name)}${cell(r.catalog)}${cell(r.amount)}${cell(r.note)}</tr>`),
    '</tbody></table>',
    deliver ? `<p>${escapeHtml(deliver)}</p>` : '',
    detail.notes ? `<p>${escapeHtml(detail.notes)}</p>` : '',
    '<p>The same list is attached as a CSV file.</p>',
    `<p>To answer, reply to this message: it goes to ${escapeHtml(sender.name)} &lt;${escapeHtml(sender.email)}&gt;.</p>`,
    `<p>${escapeHtml(sender.name)}, stockroom</p>`,
  ].join('\n')
  return {
    subject: `Purchase request ${detail.id}: ${detail.title}`,
    text,
    html,
    attachments: [{
      filename: `purchase-request-${detail.id}.csv`,
      contentType: 'text/csv',
      content: Buffer.from(orderSheetCsv(request.lines), 'utf8').toString('base64'),
    }],
  }
}
