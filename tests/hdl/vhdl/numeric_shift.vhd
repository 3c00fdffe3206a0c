-- numeric_shift: behavioural W-bit shifter written with ieee.numeric_std's shift_left and
-- shift_right, for running arithvec's shl, shr and sra testbenches on a VHDL simulator.
-- OP = 0 shl, 1 shr, 2 sra. The amount port sh is AW bits wide (std_logic_vector, not a
-- single std_logic).
--   y = shifted a; co = the bit shifted out last, 0 for amount 0; zero = y is 0; neg = y's MSB.
-- arithvec convention: large_amount = "saturate" (an amount of W or more shifts every bit out;
-- co is a(0) or a(W-1) at amount W and a fill bit beyond).
-- BUG = 1 injects one bug: sra fills with 0 (shift_right on unsigned) instead of the sign bit.
--
-- numeric_std rules this model relies on (IEEE 1076-2008 clause 16.8, numeric_std; from
-- memory): shift_left and shift_right on unsigned fill the vacated bits with '0';
-- shift_right on signed fills them with the sign bit; a count of the operand's length or more
-- leaves only fill bits. The operand is widened by one bit so the last bit shifted out lands
-- in the extra bit.
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;

entity numeric_shift is
    generic (
        W   : natural := 16;
        AW  : natural := 5;
        OP  : natural := 0;
        BUG : natural := 0);
    port (
        a    : in  std_logic_vector(W - 1 downto 0);
        sh   : in  std_logic_vector(AW - 1 downto 0);
        y    : out std_logic_vector(W - 1 downto 0);
        co   : out std_logic;
        zero : out std_logic;
        neg  : out std_logic);
end entity numeric_shift;

architecture behavioural of numeric_shift is
    signal result : std_logic_vector(W - 1 downto 0);
begin
    assert W >= 1 and AW >= 1 and OP <= 2 report "numeric_shift: bad generics" severity failure;

    process (a, sh)
        variable n    : natural;
        variable wide : std_logic_vector(W downto 0);
    begin
        n := to_integer(unsigned(sh));
        case OP is
            when 0 =>
                -- '0' & a: bit W catches the last bit shifted out of the top.
                wide   := std_logic_vector(shift_left(unsigned('0' & a), n));
                result <= wide(W - 1 downto 0);
                co     <= wide(W);
            when 1 =>
                -- a & '0': bit 0 catches the last bit shifted out of the bottom.
                wide   := std_logic_vector(shift_right(unsigned(a & '0'), n));
                result <= wide(W downto 1);
                co     <= wide(0);
            when others =>
                if BUG = 1 then
                    wide := std_logic_vector(shift_right(unsigned(a & '0'), n));
                else
                    wide := std_logic_vector(shift_right(signed(a & '0'), n));
                end if;
                result <= wide(W downto 1);
                co     <= wide(0);
        end case;
    end process;

    y    <= result;
    zero <= '1' when unsigned(result) = 0 else '0';
    neg  <= result(W - 1);
end architecture behavioural;
