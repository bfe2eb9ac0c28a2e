"""Hard caps that keep any formula cheap to read and to evaluate."""

MAX_LENGTH = 4096  # characters in one formula
MAX_DEPTH = 64  # nesting of parentheses, calls, unary signs and powers
MAX_NODES = 1000  # nodes in the parsed tree
MAX_HEIGHT = 200  # longest path in the tree (a + b + c + ... chains too), so no walk recurses deeply
MAX_LITERAL_DIGITS = 60  # significant digits in one numeric literal
MAX_LITERAL_EXPONENT = 1000  # |E| in a literal such as 1e-3
MAX_CONSTANT_POWER = 1000  # |n| for a literal exponent in x^n
MAX_ARGUMENTS = 8  # arguments of min and max
