// Courses: a course, its settings and its owners. Routes import from here.

export { addCourseOwner, createCourse, updateCourse, updateCourseSettings } from './course-commands'
export { courseDetail, courseListJson } from './course-views'
export { copyCourse, previewCourseCopy } from './course-copy'
