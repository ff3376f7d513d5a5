! The C interface from Fortran through iso_c_binding: values printed as
! "float<TAB>expression<TAB>value" lines that capi/tests/run.sh compares
! with recoup on the Rust side; error codes checked here.
program check
  use iso_c_binding
  implicit none
  interface
    integer(c_int) function recoup_3j(a, b, c, x, y, z, out) bind(c, name="recoup_3j")
      import :: c_int, c_double
      integer(c_int), value :: a, b, c, x, y, z
      real(c_double), intent(out) :: out
    end function
    integer(c_int) function recoup_6j(a, b, c, d, e, f, out) bind(c, name="recoup_6j")
      import :: c_int, c_double
      integer(c_int), value :: a, b, c, d, e, f
      real(c_double), intent(out) :: out
    end function
    integer(c_int) function recoup_3j_family(b, c, y, z, first, values, length, count) &
        bind(c, name="recoup_3j_family")
      import :: c_int, c_double, c_size_t
      integer(c_int), value :: b, c, y, z
      integer(c_int), intent(out) :: first
      real(c_double), intent(out) :: values(*)
      integer(c_size_t), value :: length
      integer(c_size_t), intent(out) :: count
    end function
    integer(c_int) function recoup_table_open(path, table) bind(c, name="recoup_table_open")
      import :: c_char, c_int, c_ptr
      character(kind=c_char), dimension(*), intent(in) :: path
      type(c_ptr), intent(out) :: table
    end function
    integer(c_int) function recoup_table_3j(table, a, b, c, x, y, z, out) &
        bind(c, name="recoup_table_3j")
      import :: c_int, c_double, c_ptr
      type(c_ptr), value :: table
      integer(c_int), value :: a, b, c, x, y, z
      real(c_double), intent(out) :: out
    end function
    subroutine recoup_table_close(table) bind(c, name="recoup_table_close")
      import :: c_ptr
      type(c_ptr), value :: table
    end subroutine
  end interface
  character(len=1), parameter :: tab = char(9)
  type(c_ptr) :: table
  character(len=256) :: path
  real(c_double) :: v
  real(c_double) :: values(64)
  integer(c_int) :: code, first
  integer(c_size_t) :: count, i
  integer :: failures = 0

  code = recoup_3j(3, 2, 1, 1, -2, 1, v)
  if (code /= 0) failures = failures + 1
  write (*, '(a)') 'float' // tab // '(3/2, 1, 1/2; 1/2, -1, 1/2)' // tab // trim(num(v))
  code = recoup_6j(3, 4, 5, 4, 3, 4, v)
  if (code /= 0) failures = failures + 1
  write (*, '(a)') 'float' // tab // '{3/2, 2, 5/2; 2, 3/2, 2}' // tab // trim(num(v))
  code = recoup_3j(2000, 2000, 2000, 0, 0, 0, v)
  if (code /= 0) failures = failures + 1
  write (*, '(a)') 'float' // tab // '(1000, 1000, 1000; 0, 0, 0)' // tab // trim(num(v))
  code = recoup_3j_family(20_c_int, 16_c_int, 4_c_int, -2_c_int, first, values, &
      int(size(values), c_size_t), count)
  if (code /= 0) failures = failures + 1
  do i = 1, count
    write (*, '(a,i0,a)') 'float' // tab // '(', first + 2 * int(i - 1), &
        '/2, 10, 8; -1, 2, -1)' // tab // trim(num(values(i)))
  end do
  ! a table written by `recoup tabulate 3j`, path as the first argument
  if (command_argument_count() > 0) then
    call get_command_argument(1, path)
    code = recoup_table_open(trim(path) // c_null_char, table)
    if (code /= 0) failures = failures + 1
    code = recoup_table_3j(table, 12_c_int, 10_c_int, 8_c_int, -6_c_int, 4_c_int, 2_c_int, v)
    if (code /= 0) failures = failures + 1
    write (*, '(a)') 'float' // tab // '(6, 5, 4; -3, 2, 1)' // tab // trim(num(v))
    code = recoup_table_3j(table, 40_c_int, 40_c_int, 40_c_int, 0_c_int, 0_c_int, 0_c_int, v)
    if (code /= 5) failures = failures + 1
    call recoup_table_close(table)
  end if
  ! a negative angular momentum is an error code
  code = recoup_3j(-2, 2, 0, 0, 0, 0, v)
  if (code /= 1) failures = failures + 1
  if (failures /= 0) then
    write (0, '(a,i0)') 'wrong error codes: ', failures
    stop 1
  end if
contains
  function num(x) result(s)
    real(c_double), intent(in) :: x
    character(len=40) :: s
    write (s, '(es25.17)') x
    s = adjustl(s)
  end function
end program
