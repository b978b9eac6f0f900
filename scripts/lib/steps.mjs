// One line of progress per step, and on failure which step broke and what to do about it.
export class StepError extends Error {
  constructor(message, hint) {
    super(message)
    this.hint = hint
  }
}

export async function step(label, work) {
  const started = performance.now()
  process.stdout.write(`▸ ${label} … `)
  try {
    const result = await work()
    const note = typeof result === 'string' ? result : result?.note
    const seconds = ((performance.now() - started) / 1000).toFixed(1)
    process.stdout.write(`${note ? `${note} ` : ''}(${seconds} s)\n`)
    return result
  } catch (error) {
    process.stdout.write('failed\n')
    console.error(`\n✗ Step "${label}" failed: ${error.message}`)
    if (error.hint) console.error(`  What to do: ${error.hint}`)
    throw Object.assign(error, { reported: true })
  }
}

export function fail(message, hint) {
  throw new StepError(message, hint)
}
