// The same scrypt hashing nuxt-auth-utils uses (its defaults), for scripts outside Nitro.
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'

const hash = new Hash(new Scrypt({}))
export const hashPassword = (password: string) => hash.make(password)
