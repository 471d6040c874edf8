"""Validates JSON documents against a tritsim JSON Schema (docs/schemas/).

Usage: validate_json.py [--invalid] [--csv-header] SCHEMA FILE...

Each FILE is a JSON document, or with --csv-header a CSV whose header row is
validated as a JSON array of column names. Exit 0 when every FILE validates;
with --invalid, when every FILE is rejected (a corrupted document must fail).
Uses Debian's python3-jsonschema (Draft 2020-12, jsonschema >= 4.0); run with
/usr/bin/python3. Exit 2 when the validator is missing or a file is unreadable.
"""
import csv
import json
import sys

try:
    import jsonschema
    from jsonschema import Draft202012Validator
except ImportError as e:
    sys.exit(f"FAIL: python3-jsonschema >= 4.0 is not importable by {sys.executable} ({e}); "
             "install it with scripts/setup (apt-get install python3-jsonschema)")


def load(path, header):
    with open(path, newline="", encoding="utf-8") as f:
        if header:
            return next(csv.reader(f))
        return json.load(f)


def describe(err):
    # A missing CSV column fails a "contains" test: name the column.
    if err.validator == "contains" and isinstance(err.validator_value, dict) \
            and "const" in err.validator_value:
        return f"no column '{err.validator_value['const']}'"
    where = "/".join(str(p) for p in err.absolute_path) or "(top)"
    return f"at {where}: {err.message[:300]}"


def main(argv):
    expect_invalid = "--invalid" in argv
    header = "--csv-header" in argv
    args = [a for a in argv if a not in ("--invalid", "--csv-header")]
    if len(args) < 2:
        sys.exit(__doc__)
    try:
        schema = load(args[0], False)
        Draft202012Validator.check_schema(schema)
    except (OSError, ValueError, jsonschema.SchemaError) as e:
        print(f"FAIL: schema {args[0]}: {e}")
        return 2
    validator = Draft202012Validator(schema)
    failed = 0
    for path in args[1:]:
        try:
            doc = load(path, header)
        except (OSError, ValueError, StopIteration) as e:
            print(f"FAIL: {path}: cannot read: {e!r}")
            return 2
        errors = sorted(validator.iter_errors(doc), key=lambda e: list(e.absolute_path))
        if expect_invalid:
            if errors:
                print(f"ok: {path} rejected ({describe(errors[0])})")
            else:
                print(f"FAIL: {path} is corrupted but validates against {args[0]}")
                failed += 1
        elif errors:
            print(f"FAIL: {path} does not validate against {args[0]}:")
            for err in errors[:10]:
                print(f"  {describe(err)}")
            failed += 1
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
