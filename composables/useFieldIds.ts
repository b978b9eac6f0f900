// Ids that tie a control to its hint and error text (aria-describedby), shared by every field.
export function useFieldIds(
  props: { id?: string, hint?: string, error?: string | null },
  prefix: string,
  extra: () => string | undefined = () => undefined,
) {
  const autoId = useId()
  const id = computed(() => props.id ?? `${prefix}-${autoId}`)
  const hintId = computed(() => `${id.value}-hint`)
  const errorId = computed(() => `${id.value}-error`)
  const describedBy = computed(() => [
    props.hint ? hintId.value : '',
    extra() ?? '',
    props.error ? errorId.value : '',
  ].filter(Boolean).join(' ') || undefined)
  return { id, hintId, errorId, describedBy }
}
