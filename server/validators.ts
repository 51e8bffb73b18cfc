/**
 * Validator compilers for routes whose body has its own door (a survey, a synthetic-line
 * request): the body goes through that door, whose errors carry the contract's codes,
 * pointers and sentences; other parts (query strings) are checked against their JSON
 * Schema with TypeBox, and their errors reach errors.ts in the same form as Fastify's own
 * (a `validation` list), so every query error reads alike.
 */
import type { FastifySchemaCompiler } from 'fastify';
import type { TSchema } from '@sinclair/typebox';
import { TypeCompiler } from '@sinclair/typebox/compiler';
import { ValueErrorType } from '@sinclair/typebox/errors';
import { Value } from '@sinclair/typebox/value';

/** What a body door answers: the value the handler receives, an error to answer, or true to pass the body on unchanged. */
export type BodyCheck = { value: unknown } | { error: Error } | true;

function queryValidator(schema: TSchema): (data: unknown) => BodyCheck {
  const checker = TypeCompiler.Compile(schema);
  return (data) => {
    const value = Value.Convert(schema, data);
    if (checker.Check(value)) return { value };
    const first = checker.Errors(value).First()!;
    const constant = (first.schema as { const?: unknown }).const;
    const message =
      first.type === ValueErrorType.ObjectAdditionalProperties
        ? 'is not one this route takes'
        : constant !== undefined
          ? `must be "${String(constant)}" or absent`
          : `must be ${String((first.schema as { type?: unknown }).type ?? 'valid')}${first.schema.minimum !== undefined ? ` of at least ${first.schema.minimum}` : ''}`;
    const error = Object.assign(new Error(message), { statusCode: 400, validation: [{ instancePath: first.path, message, params: {} }] });
    return { error };
  };
}

/** A route-level validator compiler: `checkBody(body, mediaType)` for the body, the schema for the rest. */
export function bodyDoorCompiler(checkBody: (body: unknown, mediaType: string) => BodyCheck): FastifySchemaCompiler<unknown> {
  return ({ schema, httpPart, contentType }) =>
    httpPart === 'body' ? (body: unknown) => checkBody(body, contentType ?? 'application/json') : queryValidator(schema as TSchema);
}
