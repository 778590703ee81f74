import type { H3Event } from 'h3'
import { RateLimiterMemory, RateLimiterRedis, RateLimiterRes } from 'rate-limiter-flexible'

// Failed sign-ins: 5 per account+address in 15 minutes, 50 per address in an hour.
// Counted in Redis so that every server process shares them; in memory if Redis is down.
export const SIGNIN_LIMITS = { perAccount: 5, accountWindowS: 15 * 60, perAddress: 50, addressWindowS: 60 * 60 }

let limiters: { account: RateLimiterRedis; address: RateLimiterRedis } | undefined

function useLimiters() {
  limiters ??= {
    account: new RateLimiterRedis({
      storeClient: useRedis(), keyPrefix: 'lw:signin:acct', points: SIGNIN_LIMITS.perAccount, duration: SIGNIN_LIMITS.accountWindowS,
      blockDuration: SIGNIN_LIMITS.accountWindowS, insuranceLimiter: new RateLimiterMemory({ points: SIGNIN_LIMITS.perAccount, duration: SIGNIN_LIMITS.accountWindowS }),
    }),
    address: new RateLimiterRedis({
      storeClient: useRedis(), keyPrefix: 'lw:signin:addr', points: SIGNIN_LIMITS.perAddress, duration: SIGNIN_LIMITS.addressWindowS,
      insuranceLimiter: new RateLimiterMemory({ points: SIGNIN_LIMITS.perAddress, duration: SIGNIN_LIMITS.addressWindowS }),
    }),
  }
  return limiters
}

const keys = (event: H3Event, email: string) => {
  const ip = getRequestIP(event, { xForwardedFor: false }) ?? 'unknown'
  return { account: `${email}|${ip}`, address: ip }
}

function tooMany(res: RateLimiterRes) {
  const seconds = Math.max(1, Math.ceil(res.msBeforeNext / 1000))
  return createError({
    statusCode: 429,
    statusMessage: `Too many failed sign-ins. Try again in ${Math.ceil(seconds / 60)} minute(s).`,
    data: { retryAfter: seconds },
  })
}

/** Refuses at once while the account+address or the address is blocked. */
export async function assertSigninAllowed(event: H3Event, email: string) {
  const l = useLimiters()
  const k = keys(event, email)
  for (const [limiter, key, max] of [[l.account, k.account, SIGNIN_LIMITS.perAccount], [l.address, k.address, SIGNIN_LIMITS.perAddress]] as const) {
    const res = await limiter.get(key)
    if (res && res.consumedPoints >= max) {
      setResponseHeader(event, 'Retry-After', Math.ceil(res.msBeforeNext / 1000))
      throw tooMany(res)
    }
  }
}

export async function recordSigninFailure(event: H3Event, email: string) {
  const l = useLimiters()
  const k = keys(event, email)
  await Promise.allSettled([l.account.consume(k.account), l.address.consume(k.address)])
}

export async function clearSigninFailures(event: H3Event, email: string) {
  await useLimiters().account.delete(keys(event, email).account).catch(() => {})
}

// Password-reset requests: 3 per e-mail address an hour (whether or not it has an account,
// so the answer says nothing about that) and 20 per network address an hour.
export const RESET_LIMITS = { perAccount: 3, perAddress: 20, windowS: 60 * 60 }

let resetLimiters: { account: RateLimiterRedis; address: RateLimiterRedis } | undefined

function useResetLimiters() {
  resetLimiters ??= {
    account: new RateLimiterRedis({
      storeClient: useRedis(), keyPrefix: 'lw:reset:acct', points: RESET_LIMITS.perAccount, duration: RESET_LIMITS.windowS,
      insuranceLimiter: new RateLimiterMemory({ points: RESET_LIMITS.perAccount, duration: RESET_LIMITS.windowS }),
    }),
    address: new RateLimiterRedis({
      storeClient: useRedis(), keyPrefix: 'lw:reset:addr', points: RESET_LIMITS.perAddress, duration: RESET_LIMITS.windowS,
      insuranceLimiter: new RateLimiterMemory({ points: RESET_LIMITS.perAddress, duration: RESET_LIMITS.windowS }),
    }),
  }
  return resetLimiters
}

/** Counts one reset request for the e-mail address and the network address; 429 once either is used up. */
export async function consumeResetRequest(event: H3Event, email: string) {
  const l = useResetLimiters()
  const ip = getRequestIP(event, { xForwardedFor: false }) ?? 'unknown'
  for (const [limiter, key] of [[l.address, ip], [l.account, email]] as const) {
    try {
      await limiter.consume(key)
    } catch (e) {
      if (!(e instanceof RateLimiterRes)) throw e
      const seconds = Math.max(1, Math.ceil(e.msBeforeNext / 1000))
      setResponseHeader(event, 'Retry-After', seconds)
      throw createError({ statusCode: 429, statusMessage: `Too many reset requests. Try again in ${Math.ceil(seconds / 60)} minute(s).`, data: { retryAfter: seconds } })
    }
  }
}
