-- numeric_divrem: behavioural W-bit divider written with ieee.numeric_std's "/" and "rem",
-- for running arithvec's divrem testbench on a VHDL simulator (rounding = "truncate",
-- div_by_zero = "all_ones").
-- SIGNED_OPS = 1: two's complement, SIGNED_OPS = 0: unsigned.
--   q = a / b, r = a rem b; dz = b is 0; ovf = a is the most negative value and b is -1
--   (always 0 when SIGNED_OPS = 0; the unsigned spec leaves the port unconnected).
-- Two cases are written out because numeric_std leaves them to the arithvec convention:
--   b = 0: numeric_std's "/" reports an error for a zero divisor, so q = all ones, r = a.
--   min / -1 (SIGNED_OPS): the true quotient 2^(W-1) does not fit; q = min, r = 0 (the
--   wrapped value).
-- A safe divisor of 1 is divided in those cases, so the library never sees a zero divisor.
--
-- numeric_std rules this model relies on (IEEE 1076-2008 clause 16.8, numeric_std; from
-- memory): "/" on signed or unsigned truncates toward zero and returns the dividend's
-- length; "rem" takes the sign of the dividend (and "mod" that of the divisor, not used).
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;

entity numeric_divrem is
    generic (
        W          : natural := 16;
        SIGNED_OPS : natural := 1);
    port (
        a   : in  std_logic_vector(W - 1 downto 0);
        b   : in  std_logic_vector(W - 1 downto 0);
        q   : out std_logic_vector(W - 1 downto 0);
        r   : out std_logic_vector(W - 1 downto 0);
        dz  : out std_logic;
        ovf : out std_logic);
end entity numeric_divrem;

architecture behavioural of numeric_divrem is
begin
    assert W >= 1 report "numeric_divrem needs W >= 1" severity failure;

    process (a, b)
        constant min_value : std_logic_vector(W - 1 downto 0) :=
            std_logic_vector(shift_left(to_unsigned(1, W), W - 1));
        constant minus_one : std_logic_vector(W - 1 downto 0) := (others => '1');
        variable by_zero   : boolean;
        variable too_big   : boolean;
        variable safe_b    : std_logic_vector(W - 1 downto 0);
    begin
        by_zero := unsigned(b) = 0;
        too_big := SIGNED_OPS /= 0 and a = min_value and b = minus_one;
        if by_zero or too_big then
            safe_b := std_logic_vector(to_unsigned(1, W));
        else
            safe_b := b;
        end if;
        if by_zero then
            q <= (others => '1');
            r <= a;
        elsif too_big then
            q <= min_value;
            r <= (others => '0');
        elsif SIGNED_OPS /= 0 then
            q <= std_logic_vector(signed(a) / signed(safe_b));
            r <= std_logic_vector(signed(a) rem signed(safe_b));
        else
            q <= std_logic_vector(unsigned(a) / unsigned(safe_b));
            r <= std_logic_vector(unsigned(a) rem unsigned(safe_b));
        end if;
        dz  <= '1' when by_zero else '0';
        ovf <= '1' when too_big else '0';
    end process;
end architecture behavioural;
