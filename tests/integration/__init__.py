"""Test package marker: no expected values here. Each test module names the source of its
expected values (published standard, closed form, reference library, common practice or
memory)."""
