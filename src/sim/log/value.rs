//! Parsing one field of a log line: radix digits, prefixes, `_` separators, Verilog literals,
//! unknown and high-impedance digits, negative decimals. The general parser here is the
//! reference for every value rule in the parent module's documentation; the fast path lives in
//! the parent and property tests hold the two together.

use super::*;

/// What is wrong with one value; the caller adds the column and the token.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum ValueError {
    Empty,
    NoDigits,
    BadDigit(u8, Base),
    UnknownDecimalDigit(u8),
    TooWide,
    OverSize(u32),
    BadSize,
    BadBase(Option<u8>),
    BelowRange,
    BelowEncodingRange(Encoding),
    NegativeUnsigned,
    BadIndex,
    IndexTooLarge,
}

impl ValueError {
    pub(super) fn message(self, token: &[u8], column: &Column) -> String {
        let col = &column.name;
        let tok = String::from_utf8_lossy(token);
        let width = match column.target {
            Target::Value { width, .. } => width,
            Target::Index => 64,
        };
        match self {
            ValueError::Empty => format!("empty value in column {col}"),
            ValueError::NoDigits => format!("value {tok} in column {col} has no digits"),
            ValueError::BadDigit(c, base) => {
                format!("bad {} digit {} in column {col}", base.name(), show_byte(c))
            }
            ValueError::UnknownDecimalDigit(c) => format!(
                "bad decimal digit {} in column {col} (a decimal value can be unknown only as a \
                 whole: x or z)",
                show_byte(c)
            ),
            ValueError::TooWide => format!("value {tok} does not fit in {width}-bit column {col}"),
            ValueError::OverSize(size) => {
                format!("value {tok} does not fit in its own {size}-bit size (column {col})")
            }
            ValueError::BadSize => format!(
                "bad size in value {tok} in column {col}: expected a decimal bit count before '"
            ),
            ValueError::BadBase(c) => format!(
                "bad base {} in value {tok} in column {col}: expected h, b, o or d after '",
                c.map_or("(none)".to_string(), show_byte)
            ),
            ValueError::BelowRange => format!(
                "value {tok} is below the {width}-bit two's-complement range (column {col})"
            ),
            ValueError::BelowEncodingRange(enc) => format!(
                "value {tok} is below the {width}-bit {} range, whose smallest value is -{} \
                 (column {col})",
                enc.name(),
                Word::ones(width.saturating_sub(1)).to_decimal()
            ),
            ValueError::NegativeUnsigned => format!(
                "value {tok} in column {col} is negative, but the unit's encoding is unsigned"
            ),
            ValueError::BadIndex => {
                format!("bad index \"{tok}\" in column {col}: expected an unsigned decimal number")
            }
            ValueError::IndexTooLarge => {
                format!("index {tok} in column {col} is larger than {}", u64::MAX)
            }
        }
    }
}

/// A byte for a message: quoted when printable, as an escape otherwise.
pub(super) fn show_byte(c: u8) -> String {
    if c.is_ascii_graphic() {
        format!("'{}'", c as char)
    } else {
        format!("'\\x{c:02x}'")
    }
}

/// The digit base of a value: the log's radix, or the base of a Verilog-style literal.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Base {
    Bin,
    Oct,
    Hex,
    Dec,
}

impl Base {
    fn name(self) -> &'static str {
        match self {
            Base::Bin => "binary",
            Base::Oct => "octal",
            Base::Hex => "hex",
            Base::Dec => "decimal",
        }
    }

    fn bits_per_digit(self) -> u32 {
        match self {
            Base::Bin => 1,
            Base::Oct => 3,
            Base::Hex | Base::Dec => 4,
        }
    }
}

/// One character of a value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Digit {
    Value(u8),
    Unknown { high_z: bool },
    Separator,
    Bad,
}

/// Classifies `c` as a digit of `base`; `std_logic` admits VHDL's `U W L H -` in binary.
pub(super) fn classify(c: u8, base: Base, std_logic: bool) -> Digit {
    match c {
        b'_' => Digit::Separator,
        b'x' | b'X' => Digit::Unknown { high_z: false },
        b'z' | b'Z' => Digit::Unknown { high_z: true },
        b'?' if base != Base::Dec => Digit::Unknown { high_z: true },
        b'U' | b'W' | b'-' if std_logic && base == Base::Bin => Digit::Unknown { high_z: false },
        b'L' if std_logic && base == Base::Bin => Digit::Value(0),
        b'H' if std_logic && base == Base::Bin => Digit::Value(1),
        _ => {
            let v = HEX_VALUE[c as usize];
            let limit = match base {
                Base::Bin => 2,
                Base::Oct => 8,
                Base::Dec => 10,
                Base::Hex => 16,
            };
            if v < limit {
                Digit::Value(v)
            } else {
                Digit::Bad
            }
        }
    }
}

/// Reads the leading hex digits of `chunk` (up to all 8) in a few word operations; returns
/// their value and count. Equivalent to the byte loop over [`HEX_VALUE`] (a property test
/// compares the two).
#[inline]
pub(super) fn hex8(chunk: [u8; 8]) -> (u64, usize) {
    const ONES: u64 = 0x0101_0101_0101_0101;
    const HIGHS: u64 = 0x8080_8080_8080_8080;
    const LOW7: u64 = 0x7f7f_7f7f_7f7f_7f7f;
    let x = u64::from_le_bytes(chunk);
    // Per byte, with bit 7 cleared first so no lane carries into the next: bit 7 of
    // `low7 + (0x80 - k)` is set exactly when the byte is >= k.
    let at_least = |low7: u64, k: u64| (low7 + ONES * (0x80 - k)) & HIGHS;
    let low7 = x & LOW7;
    let digit = at_least(low7, b'0' as u64) & !at_least(low7, b'9' as u64 + 1);
    // Setting bit 5 folds 'A'..='F' onto 'a'..='f' and leaves no other byte in that range.
    let folded = (x | (ONES * 0x20)) & LOW7;
    let letter = at_least(folded, b'a' as u64) & !at_least(folded, b'f' as u64 + 1);
    let valid = (digit | letter) & !x & HIGHS;
    let count = ((!valid & HIGHS).trailing_zeros() / 8) as usize;
    if count == 0 {
        return (0, 0);
    }
    // Digit values: the low nibble, plus 9 for letters (bit 6 set).
    let nibbles = (x & (ONES * 0x0f)) + ((x >> 6) & ONES) * 9;
    // Keep the `count` digits, last digit in the lowest byte, then pack pairs, quads, octets.
    let mut y = (nibbles << (8 * (8 - count))).swap_bytes();
    y = (y | y >> 4) & 0x00ff_00ff_00ff_00ff;
    y = (y | y >> 8) & 0x0000_ffff_0000_ffff;
    y = (y | y >> 16) & 0x0000_0000_ffff_ffff;
    (y, count)
}

/// Hex digit values by byte; 0xff for anything else.
pub(super) const HEX_VALUE: [u8; 256] = {
    let mut table = [0xffu8; 256];
    let mut i = 0;
    while i < 10 {
        table[b'0' as usize + i] = i as u8;
        i += 1;
    }
    let mut i = 0;
    while i < 6 {
        table[b'a' as usize + i] = 10 + i as u8;
        table[b'A' as usize + i] = 10 + i as u8;
        i += 1;
    }
    table
};

/// Parses the `index` column: unsigned decimal, no sign, no separators.
pub(super) fn parse_index(token: &[u8]) -> std::result::Result<u64, ValueError> {
    if token.is_empty() {
        return Err(ValueError::Empty);
    }
    let mut v: u64 = 0;
    let mut overflow = false;
    for &c in token {
        let d = c.wrapping_sub(b'0');
        if d > 9 {
            return Err(ValueError::BadIndex);
        }
        match v.checked_mul(10).and_then(|v| v.checked_add(d as u64)) {
            Some(n) => v = n,
            None => overflow = true,
        }
    }
    if overflow {
        return Err(ValueError::IndexTooLarge);
    }
    Ok(v)
}

/// Strips a `0x`/`0X` prefix unless the token is exactly as long as `%h` prints a value of
/// `width` bits (then the `x` is an unknown digit; see the module documentation).
pub(super) fn strip_hex_prefix(token: &[u8], width: u32) -> &[u8] {
    if token.len() >= 2
        && token[0] == b'0'
        && (token[1] | 0x20) == b'x'
        && token.len() != hex_digits(width) as usize
    {
        &token[2..]
    } else {
        token
    }
}

pub(super) fn strip_bin_prefix(token: &[u8]) -> &[u8] {
    if token.len() >= 2 && token[0] == b'0' && (token[1] | 0x20) == b'b' {
        &token[2..]
    } else {
        token
    }
}

/// Parses one port value of `width` bits into `out`.
#[inline]
pub(super) fn parse_value(
    token: &[u8],
    radix: Radix,
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    if let Some(v) = parse_plain_u64(token, radix, width) {
        if width < 64 && v >> width != 0 {
            return Err(ValueError::TooWide);
        }
        *out = FieldValue::known(Word::from_u64(v));
        return Ok(());
    }
    parse_general(token, radix, width, out)
}

/// The hot path: a token of plain digits that fits in 64 bits, in one tight loop. Returns None
/// for anything else (unknown digits, separators, literals, long tokens, errors), which the
/// general path then handles with the same rules.
#[inline]
pub(super) fn parse_plain_u64(token: &[u8], radix: Radix, width: u32) -> Option<u64> {
    let mut v: u64 = 0;
    match radix {
        Radix::Hex => {
            let digits = strip_hex_prefix(token, width);
            if digits.is_empty() || digits.len() > 16 {
                return None;
            }
            for &c in digits {
                let d = HEX_VALUE[c as usize];
                if d > 15 {
                    return None;
                }
                v = v << 4 | d as u64;
            }
        }
        Radix::Bin => {
            let digits = strip_bin_prefix(token);
            if digits.is_empty() || digits.len() > 64 {
                return None;
            }
            for &c in digits {
                let d = c.wrapping_sub(b'0');
                if d > 1 {
                    return None;
                }
                v = v << 1 | d as u64;
            }
        }
        Radix::Dec => {
            if token.is_empty() || token.len() > 19 {
                return None;
            }
            for &c in token {
                let d = c.wrapping_sub(b'0');
                if d > 9 {
                    return None;
                }
                v = v * 10 + d as u64;
            }
        }
    }
    Some(v)
}

/// Every value form, at any width.
pub(super) fn parse_general(
    token: &[u8],
    radix: Radix,
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    if token.is_empty() {
        return Err(ValueError::Empty);
    }
    if let Some(quote) = token.iter().position(|&c| c == b'\'') {
        return parse_literal(&token[..quote], &token[quote + 1..], width, out);
    }
    // GHDL prints one-bit ports with `write`: U W - L H are std_logic values in every radix.
    if let [c @ (b'U' | b'W' | b'-' | b'L' | b'H')] = token {
        return parse_digits(&[*c], Base::Bin, true, width, None, out);
    }
    match radix {
        Radix::Hex => parse_digits(
            strip_hex_prefix(token, width),
            Base::Hex,
            false,
            width,
            None,
            out,
        ),
        Radix::Bin => parse_digits(strip_bin_prefix(token), Base::Bin, true, width, None, out),
        Radix::Dec => match token.strip_prefix(b"-") {
            Some(magnitude) => parse_negative_decimal(magnitude, width, out),
            None => parse_digits(token, Base::Dec, false, width, None, out),
        },
    }
}

/// Parses the part after the `'` of a Verilog-style literal `[size]'[s]<base><digits>`.
pub(super) fn parse_literal(
    size: &[u8],
    rest: &[u8],
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    let size = if size.is_empty() {
        None
    } else {
        match parse_index(size) {
            Ok(n @ 1..=0xffff_ffff) => Some(n as u32),
            _ => return Err(ValueError::BadSize),
        }
    };
    let rest = match rest.first() {
        Some(b's' | b'S') => &rest[1..],
        _ => rest,
    };
    let base = match rest.first().map(|c| c | 0x20) {
        Some(b'h') => Base::Hex,
        Some(b'b') => Base::Bin,
        Some(b'o') => Base::Oct,
        Some(b'd') => Base::Dec,
        other => return Err(ValueError::BadBase(other.map(|_| rest[0]))),
    };
    parse_digits(&rest[1..], base, false, width, Some(size), out)
}

/// Parses digits of `base`. `literal` is `Some(size)` inside a Verilog-style literal, where an
/// unknown leftmost digit extends up to the size (or the width when unsized); in a plain value
/// only a single unknown character does that, covering the whole field.
pub(super) fn parse_digits(
    digits: &[u8],
    base: Base,
    std_logic: bool,
    width: u32,
    literal: Option<Option<u32>>,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    let mut bits = [0u64; LIMBS];
    let mut unknown = [0u64; LIMBS];
    // The bits of the high-impedance digits among the unknown ones, kept apart so that a
    // report shows each digit as it was printed (x or z).
    let mut impedance = [0u64; LIMBS];
    let mut high_z = false;
    let mut count = 0usize;
    let mut leftmost_unknown = false;
    let mut leftmost_z = false;
    let mut pos: u32 = 0;
    if base == Base::Dec {
        for &c in digits {
            match classify(c, base, false) {
                Digit::Separator => continue,
                Digit::Value(d) => {
                    if !mul_add(&mut bits, 10, d as u64) {
                        return Err(ValueError::TooWide);
                    }
                    leftmost_unknown = false;
                }
                Digit::Unknown { high_z: z } => {
                    if count > 0 || digits.iter().filter(|&&c| c != b'_').count() > 1 {
                        return Err(ValueError::UnknownDecimalDigit(c));
                    }
                    high_z = z;
                    leftmost_unknown = true;
                    leftmost_z = z;
                }
                Digit::Bad => return Err(ValueError::BadDigit(c, base)),
            }
            count += 1;
        }
    } else {
        let shift = base.bits_per_digit();
        let digit_mask = (1u64 << shift) - 1;
        for &c in digits.iter().rev() {
            match classify(c, base, std_logic) {
                Digit::Separator => continue,
                Digit::Value(d) => {
                    if !or_at(&mut bits, pos, d as u64) {
                        return Err(ValueError::TooWide);
                    }
                    leftmost_unknown = false;
                }
                Digit::Unknown { high_z: z } => {
                    or_at(&mut unknown, pos, digit_mask);
                    if z {
                        or_at(&mut impedance, pos, digit_mask);
                    }
                    high_z |= z;
                    leftmost_unknown = true;
                    leftmost_z = z;
                }
                Digit::Bad => {
                    // Name the first bad character, not the last.
                    let first = digits
                        .iter()
                        .copied()
                        .find(|&c| classify(c, base, std_logic) == Digit::Bad)
                        .unwrap_or(c);
                    return Err(ValueError::BadDigit(first, base));
                }
            }
            count += 1;
            pos = pos.saturating_add(shift);
        }
    }
    if count == 0 {
        return Err(ValueError::NoDigits);
    }
    // How far an unknown leftmost digit reaches.
    let extend_to = match literal {
        Some(size) => leftmost_unknown.then(|| size.unwrap_or(width)),
        None => (count == 1 && leftmost_unknown).then_some(width),
    };
    let mut unknown = Word::from_limbs(unknown);
    let mut impedance = Word::from_limbs(impedance);
    if let Some(top) = extend_to {
        let top = top.min(MAX_WIDTH);
        let above = Word::ones(top).and(&Word::ones(pos.min(top)).not(top));
        unknown = unknown.or(&above);
        if leftmost_z {
            impedance = impedance.or(&above);
        }
    }
    let bits = Word::from_limbs(bits);
    if let Some(Some(size)) = literal {
        if size < width && !bits.masked(size).eq(&bits) {
            return Err(ValueError::OverSize(size));
        }
        unknown = unknown.masked(size);
    }
    if !bits.masked(width).eq(&bits) {
        return Err(ValueError::TooWide);
    }
    let unknown = unknown.masked(width);
    *out = FieldValue {
        bits: bits.and(&unknown.not(MAX_WIDTH)),
        unknown,
        high_z: high_z && !unknown.is_zero(),
        z: impedance.and(&unknown),
    };
    Ok(())
}

/// A signed decimal `-magnitude` in a value column, encoded in the spec's encoding (see the
/// parent module's documentation): the log gave a value, and the checker compares patterns.
pub(super) fn parse_signed_decimal(
    magnitude: &[u8],
    width: u32,
    encoding: Encoding,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    let msb = Word::bit_mask(width - 1);
    match encoding {
        Encoding::Twos => parse_negative_decimal(magnitude, width, out),
        // Offset binary is two's complement with the top bit inverted.
        Encoding::Offset => {
            parse_negative_decimal(magnitude, width, out)?;
            out.bits = out.bits.xor(&msb);
            Ok(())
        }
        Encoding::Unsigned => {
            parse_negative_decimal(magnitude, width, out)?;
            if out.bits.is_zero() {
                Ok(())
            } else {
                Err(ValueError::NegativeUnsigned)
            }
        }
        Encoding::Ones | Encoding::SignMagnitude => {
            let m = Word::from_limbs(decimal_magnitude(magnitude)?);
            if m.significant_bits() > width - 1 {
                return Err(ValueError::BelowEncodingRange(encoding));
            }
            let pattern = if encoding == Encoding::Ones {
                m.not(width)
            } else {
                m.or(&msb)
            };
            *out = FieldValue::known(pattern);
            Ok(())
        }
    }
}

/// The digits of a decimal magnitude (with `_` separators), as limbs.
fn decimal_magnitude(magnitude: &[u8]) -> std::result::Result<[u64; LIMBS], ValueError> {
    let mut m = [0u64; LIMBS];
    let mut count = 0;
    for &c in magnitude {
        match classify(c, Base::Dec, false) {
            Digit::Separator => continue,
            Digit::Value(d) => {
                if !mul_add(&mut m, 10, d as u64) {
                    return Err(ValueError::BelowRange);
                }
            }
            Digit::Unknown { .. } => return Err(ValueError::UnknownDecimalDigit(c)),
            Digit::Bad => return Err(ValueError::BadDigit(c, Base::Dec)),
        }
        count += 1;
    }
    if count == 0 {
        return Err(ValueError::NoDigits);
    }
    Ok(m)
}

/// A negative decimal: the two's-complement pattern of `-magnitude` in `width` bits.
pub(super) fn parse_negative_decimal(
    magnitude: &[u8],
    width: u32,
    out: &mut FieldValue,
) -> std::result::Result<(), ValueError> {
    let mut m = decimal_magnitude(magnitude)?;
    if m.iter().all(|&l| l == 0) {
        *out = FieldValue::known(Word::ZERO);
        return Ok(());
    }
    // -m = ~(m - 1); it is in range when m - 1 < 2^(width - 1).
    let mut borrow = true;
    for limb in m.iter_mut() {
        let (v, b) = limb.overflowing_sub(borrow as u64);
        *limb = v;
        borrow = b;
    }
    let below = Word::from_limbs(m);
    if below.significant_bits() > width - 1 {
        return Err(ValueError::BelowRange);
    }
    *out = FieldValue::known(below.not(width));
    Ok(())
}

/// `limbs = limbs * factor + add`; false when the result needs more than 512 bits.
pub(super) fn mul_add(limbs: &mut [u64; LIMBS], factor: u64, add: u64) -> bool {
    let mut carry = add as u128;
    for limb in limbs.iter_mut() {
        let cur = *limb as u128 * factor as u128 + carry;
        *limb = cur as u64;
        carry = cur >> 64;
    }
    carry == 0
}

/// ORs `value` (at most 4 bits wide) in at bit `pos`; false when a set bit would land at or
/// above 512.
pub(super) fn or_at(limbs: &mut [u64; LIMBS], pos: u32, value: u64) -> bool {
    if value == 0 {
        return true;
    }
    if pos >= MAX_WIDTH {
        return false;
    }
    let (i, offset) = ((pos / 64) as usize, pos % 64);
    limbs[i] |= value << offset;
    if offset > 60 {
        let spill = value >> (64 - offset);
        if spill != 0 {
            if i + 1 == LIMBS {
                return false;
            }
            limbs[i + 1] |= spill;
        }
    }
    true
}
