import type { InjectionKey, MaybeRefOrGetter } from 'vue'
import type { FieldErrors } from '#shared/types'
import { formatDecimal, readDecimal } from '#shared/utils/decimal'

// Every typed number goes through the one parser with the person's decimal mark. A form that uses
// `useForm` collects the number fields inside it, so a number that cannot be read (or could be read
// two ways) stops the save with the parser's own message under that field.

interface NumberFieldEntry { name: string, problem: () => string }
interface NumberFieldRegistry { fields: Set<NumberFieldEntry>, attempted: Ref<boolean> }

const NUMBER_FIELDS: InjectionKey<NumberFieldRegistry> = Symbol('number-fields')

/** Called by `useForm`: the number fields of this form register here. */
export function provideNumberFields() {
  const registry: NumberFieldRegistry = { fields: new Set(), attempted: ref(false) }
  if (getCurrentInstance()) provide(NUMBER_FIELDS, registry)
  return {
    /** Field messages for every number that cannot be read; empty when all are fine. */
    check(): FieldErrors {
      registry.attempted.value = true
      const errors: FieldErrors = {}
      for (const field of registry.fields) {
        const problem = field.problem()
        if (problem) errors[field.name] = [problem]
      }
      return errors
    },
  }
}

/**
 * One typed number: what it was read as (`value`), the text "= 1,250 g" in the person's own style,
 * and the parser's message when it is refused (shown once the field was left or a save was tried).
 */
export function useNumberInput(text: MaybeRefOrGetter<string | undefined>, options: { name: MaybeRefOrGetter<string>, unit?: MaybeRefOrGetter<string | undefined> }) {
  const session = useSessionStore()
  const registry = inject(NUMBER_FIELDS, null)
  const touched = ref(false)
  const typed = computed(() => String(toValue(text) ?? '').trim())
  const reading = computed(() => (typed.value === '' ? null : readDecimal(typed.value, session.decimalMark)))
  const value = computed(() => (reading.value?.ok ? reading.value.value : undefined))
  const understood = computed(() => {
    if (value.value === undefined) return ''
    const unit = toValue(options.unit)
    return `= ${formatDecimal(value.value, session.decimalMark, 6)}${unit ? ` ${unit}` : ''}`
  })
  const problem = computed(() => (reading.value && !reading.value.ok ? reading.value.message : ''))
  const shownProblem = computed(() => (touched.value || registry?.attempted.value ? problem.value : ''))

  const entry: NumberFieldEntry = {
    get name() {
      return toValue(options.name)
    },
    problem: () => problem.value,
  }
  onMounted(() => registry?.fields.add(entry))
  onBeforeUnmount(() => registry?.fields.delete(entry))

  function touch() {
    touched.value = true
  }

  return { value, understood, problem, shownProblem, touch }
}
