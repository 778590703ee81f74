// Where `npm test` serves the stack; a test file run outside it fails with a clear message.
function need(name: string) {
  const v = process.env[name]
  if (!v) throw new Error(`${name} is not set: run these tests through \`npm test\`, which starts the services`)
  return v
}

export const APP_URL = () => need('LW_APP_URL')
export const MAIL_UI_URL = () => need('LW_MAIL_UI_URL')
export const DATABASE_URL = () => need('NUXT_DATABASE_URL')
