// oidc-provider ships no type declarations; this covers only what the local stand-in uses.
declare module 'oidc-provider' {
  import type { IncomingMessage, ServerResponse } from 'node:http'

  export interface Grant {
    addOIDCScope(scope: string): void
    save(): Promise<string>
  }

  export interface OidcContext {
    oidc: {
      client: { clientId: string }
      session: { accountId?: string; grantIdFor(clientId: string): string | undefined }
      result?: { consent?: { grantId?: string } }
      params: Record<string, unknown>
      provider: Provider
    }
    host: string
    type: string
    body: unknown
  }

  export interface Interaction {
    uid: string
    prompt: { name: string }
    params: Record<string, unknown>
  }

  export interface Account {
    accountId: string
    claims(): Record<string, unknown> | Promise<Record<string, unknown>>
  }

  export interface Configuration {
    findAccount?(ctx: OidcContext, id: string): Promise<Account | undefined> | Account | undefined
    loadExistingGrant?(ctx: OidcContext): Promise<Grant | undefined>
    interactions?: { url(ctx: OidcContext, interaction: Interaction): string | Promise<string> }
    renderError?(ctx: OidcContext, out: Record<string, string>, error: Error): void | Promise<void>
    [setting: string]: unknown
  }

  export class Provider {
    constructor(issuer: string, configuration?: Configuration)
    callback(): (req: IncomingMessage, res: ServerResponse) => void
    interactionDetails(req: IncomingMessage, res: ServerResponse): Promise<Interaction>
    interactionFinished(
      req: IncomingMessage,
      res: ServerResponse,
      result: Record<string, unknown>,
      options?: { mergeWithLastSubmission?: boolean },
    ): Promise<void>
    Grant: {
      new (properties: { clientId: string; accountId?: string }): Grant
      find(id: string): Promise<Grant | undefined>
    }
  }

  export default Provider
}
