/** plumbline's version, kept in step with package.json by test/adapters/version.test.ts. */
export const toolVersion = '0.1.0'
