"""Field tables: one definition per input object, read by its parser and by the API's JSON Schema.

A :class:`Record` lists an object's fields (:class:`Field`): name, whether it is required and what
the error says when it is missing, its bounds and unit (numbers), its choices (strings), or the
record of its items. The parser takes its key list, required fields and bounds from the table
(:meth:`Record.check`, :meth:`Record.require`, :meth:`Record.number`), and
:func:`fieldkit.service.openapi` writes the JSON Schema from the same table (:meth:`Record.schema`),
so the two cannot drift apart.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field, replace
from typing import Any

from fieldkit.errors import InputError, check_keys, join, number

JSON_TYPES = {"string", "number", "integer", "boolean", "object", "array", "null"}


@dataclass(frozen=True)
class Field:
    """One field of an input object.

    Attributes
    ----------
    name : the JSON name (units in the name: ``height_m``)
    schema : JSON Schema of the value beyond what the other attributes say (type, format, oneOf)
    required : the parser refuses the object without it
    missing : the error's detail when it is missing (what to give)
    description : plain words for the API description
    unit, minimum, maximum, exclusive_minimum, integer : a number's bounds (``kind == "number"``)
    choices : the allowed strings
    record : the record of the value (an object) or of its items (an array of objects)
    many : the value is an array (of ``record``, or of numbers with these bounds)
    """

    name: str
    kind: str = "any"  # number | string | boolean | object | array | any
    required: bool = False
    missing: str = "required"
    description: str = ""
    unit: str = ""
    minimum: float | None = None
    maximum: float | None = None
    exclusive_minimum: bool = False
    integer: bool = False
    choices: tuple[str, ...] = ()
    record: Record | None = None
    many: bool = False
    schema: Mapping[str, Any] = field(default_factory=dict)
    refers: tuple[Record, ...] = ()  # records named in ``schema`` (a oneOf of objects)
    nullable: bool = False  # null is accepted (and means "not given")

    def missing_detail(self) -> str:
        """What to give when the field is missing: its own words, else its description and unit."""
        if self.missing != "required" or not self.description:
            return self.missing
        unit = f" in {self.unit}" if self.unit else ""
        return f"required: {self.description}{unit}"

    def read_number(self, value: Any, path: str) -> float:
        """The value as a number within this field's bounds (the error names ``path``)."""
        return number(
            value,
            path,
            unit=self.unit,
            minimum=self.minimum,
            maximum=self.maximum,
            exclusive_minimum=self.exclusive_minimum,
            integer=self.integer,
        )

    def json_schema(self) -> dict[str, Any]:
        out = self._value_schema()
        if self.many:
            out = {"type": "array", "items": out}
        out = {**out, **self.schema}
        if self.nullable:
            out = {"oneOf": [out, {"type": "null"}]}
        if self.description:
            out["description"] = self.description
        return out

    def _value_schema(self) -> dict[str, Any]:
        if self.record is not None:
            return ref(self.record)
        if self.kind == "number":
            return self._number_schema()
        if self.kind == "string":
            return (
                {"type": "string", "enum": list(self.choices)}
                if self.choices
                else {"type": "string"}
            )
        if self.kind in JSON_TYPES:
            return {"type": self.kind}
        return {}

    def _number_schema(self) -> dict[str, Any]:
        out: dict[str, Any] = {"type": "integer" if self.integer else "number"}
        if self.minimum is not None:
            out["exclusiveMinimum" if self.exclusive_minimum else "minimum"] = self.minimum
        if self.maximum is not None:
            out["maximum"] = self.maximum
        if self.unit:
            out["x-unit"] = self.unit
        return out


def ref(record: Record) -> dict[str, str]:
    """A JSON Schema reference to a record's schema."""
    return {"$ref": f"#/components/schemas/{record.name}"}


def num(name: str, unit: str = "", lo: float | None = None, hi: float | None = None, **kw) -> Field:
    """A number field with its unit and bounds (``exclusive_minimum``, ``integer`` by keyword)."""
    return Field(name, "number", unit=unit, minimum=lo, maximum=hi, **kw)


def string(name: str, *choices: str, **kw) -> Field:
    """A string field, with its allowed values when given."""
    return Field(name, "string", choices=tuple(choices), **kw)


def nested(name: str, record: Record | None = None, **kw) -> Field:
    """An object field (described by ``record`` when it has one)."""
    return Field(name, "object", record=record, **kw)


def arr(name: str, record: Record | None = None, **kw) -> Field:
    """An array field (of ``record`` objects when given)."""
    return Field(name, "array", record=record, many=record is not None, **kw)


def flag(name: str, **kw) -> Field:
    """A true/false field."""
    return Field(name, "boolean", **kw)


@dataclass(frozen=True)
class Record:
    """The fields of one input object, in the order the parser reads them."""

    name: str
    fields: tuple[Field, ...]
    description: str = ""
    one_of: tuple[tuple[str, ...], ...] = ()  # groups of fields of which exactly one is given

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(f.name for f in self.fields)

    @property
    def required(self) -> tuple[str, ...]:
        return tuple(f.name for f in self.fields if f.required)

    def field(self, name: str) -> Field:
        for f in self.fields:
            if f.name == name:
                return f
        raise KeyError(name)

    def check(self, obj: Mapping[str, Any], path: str) -> None:
        """Refuse a field this record does not have, naming it."""
        check_keys(obj, path, self.names)

    def require(
        self, obj: Mapping[str, Any], path: str, names: Iterable[str] | None = None
    ) -> None:
        """Refuse the object when a required field (of ``names``, default all) is missing."""
        for name in self.required if names is None else names:
            if name not in obj:
                raise InputError(join(path, name), self.field(name).missing_detail())

    def number(self, obj: Mapping[str, Any], path: str, name: str, default: Any = None) -> float:
        """``obj[name]`` (or ``default``) checked against the field's bounds."""
        return self.field(name).read_number(obj.get(name, default), join(path, name))

    def variant(
        self,
        name: str,
        *,
        optional: Iterable[str] = (),
        description: str = "",
        one_of: tuple[tuple[str, ...], ...] | None = None,
    ) -> Record:
        """The same fields under another name, with ``optional`` no longer required (and other
        one-of groups when given)."""
        optional = set(optional)
        fields = tuple(replace(f, required=False) if f.name in optional else f for f in self.fields)
        groups = self.one_of if one_of is None else one_of
        return Record(name, fields, description or self.description, groups)

    def written(self, out: dict[str, Any]) -> dict[str, Any]:
        """A JSON writer's object, checked against this table: every field it writes is declared and
        every required one is there (a writer cannot drift from its documented schema)."""
        extra = [k for k in out if k not in self.names]
        missing = [k for k in self.required if k not in out]
        if extra or missing:
            raise RuntimeError(f"{self.name}: undeclared fields {extra}, missing fields {missing}")
        return out

    def schema(self) -> dict[str, Any]:
        """The object's JSON Schema (unknown fields are refused)."""
        out: dict[str, Any] = {"type": "object", "additionalProperties": False}
        if self.description:
            out["description"] = self.description
        if self.required:
            out["required"] = list(self.required)
        out["properties"] = {f.name: f.json_schema() for f in self.fields}
        if self.one_of:
            out["allOf"] = [
                {"oneOf": [{"required": [name]} for name in group]} for group in self.one_of
            ]
        return out


def schemas(*records: Record) -> dict[str, dict[str, Any]]:
    """JSON Schemas of these records and of every record they refer to, by name."""
    out: dict[str, dict[str, Any]] = {}
    todo = list(records)
    while todo:
        r = todo.pop()
        if r.name in out:
            continue
        out[r.name] = r.schema()
        todo += [f.record for f in r.fields if f.record is not None]
        todo += [x for f in r.fields for x in f.refers]
    return dict(sorted(out.items()))
