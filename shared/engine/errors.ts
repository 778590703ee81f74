/** Input the engine cannot measure; the message is meant for the person who sent it. */
export class EngineInputError extends Error {
  override name = 'EngineInputError'
}
