import type { ComputedRef, InjectionKey, MaybeRefOrGetter } from 'vue'

const COURSE_ZONE: InjectionKey<ComputedRef<string | null>> = Symbol('halocline-course-zone')

/**
 * A page about one course says so once: every date below it (`useDateDisplay()`, `<BaseTime>`)
 * is then shown on the course's wall clock, whoever reads it and wherever they are.
 *
 *   provideCourseZone(() => practical.value?.timezone)
 */
export function provideCourseZone(zone: MaybeRefOrGetter<string | null | undefined>): ComputedRef<string | null> {
  const course = computed(() => toValue(zone) || null)
  provide(COURSE_ZONE, course)
  return course
}

/** The zone of the course the page is about, or null outside a course. */
export function injectCourseZone(): ComputedRef<string | null> | null {
  return inject(COURSE_ZONE, null)
}
